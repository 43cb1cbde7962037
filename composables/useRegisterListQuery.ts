import type { LocationQueryRaw } from 'vue-router'

/**
 * A server-side list's search, filters, sort and page, kept in the URL so that a list can be shared, reloaded and
 * walked back. Values equal to their defaults stay out of the URL; changing a filter goes back to page 1.
 */
export function useRegisterListQuery<T extends Record<string, string>>(defaults: T) {
  const route = useRoute()
  const router = useRouter()

  const state = computed<T>(() => {
    const out = { ...defaults }
    for (const key of Object.keys(defaults) as Array<keyof T>) {
      const v = route.query[key as string]
      if (typeof v === 'string') out[key] = v as T[keyof T]
    }
    return out
  })

  function update(patch: Partial<T>) {
    const next: Record<string, string> = { ...state.value, ...patch }
    if (!('page' in patch) && 'page' in defaults) next.page = defaults.page as string
    const query: LocationQueryRaw = { ...route.query }
    for (const [key, value] of Object.entries(next)) {
      if (value === defaults[key] || value === '') delete query[key]
      else query[key] = value
    }
    return router.push({ query })
  }

  /** The state as API query parameters (empty values left out). */
  const apiQuery = computed(() => Object.fromEntries(Object.entries(state.value).filter(([, v]) => v !== '')))

  return { state, update, apiQuery }
}
