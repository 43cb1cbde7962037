import type { OrganisationSummary, Profile } from '#shared/types/api'

/** The organisation slug in the URL (the source of truth for the current organisation), or null. */
export function useOrgSlug() {
  const route = useRoute()
  return computed(() => (typeof route.params.org === 'string' && route.params.org ? route.params.org : null))
}

/**
 * The current organisation's summary (GET /api/orgs/:org). The org layout and the pages share it through
 * one key, so it is fetched once per organisation.
 */
export function useOrgSummary() {
  const slug = useOrgSlug()
  const fetcher = useRequestFetch()
  return useAsyncData(
    () => `org:${slug.value ?? '-'}`,
    () => (slug.value ? fetcher<OrganisationSummary>(`/api/orgs/${slug.value}`) : Promise.resolve(null)),
  )
}

/** The signed-in person's profile with their organisations (GET /api/account/me). */
export function useProfile() {
  const fetcher = useRequestFetch()
  return useAsyncData('me', () => fetcher<Profile>('/api/account/me'))
}

/**
 * A lost-access message for the org layout: set when an organisation route answers 403
 * (removed member, role changed meanwhile); the layout shows it instead of the page.
 */
export function useOrgAccess() {
  const state = useState<string | null>('org-access-denied', () => null)
  return {
    message: state,
    report(message: string) {
      state.value = message
    },
    clear() {
      state.value = null
    },
  }
}
