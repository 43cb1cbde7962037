import type { Attachment } from '#shared/types/attachment'

/** Stored images of the findings a list shows, in one request (`GET findings/attachments?ids=…`), keyed by finding id. */
export function useFindingThumbnails(slug: MaybeRefOrGetter<string | null | undefined>, findingIds: MaybeRefOrGetter<string[]>) {
  const ids = computed(() => toValue(findingIds).join(','))
  const { data } = useFetch<Record<string, Attachment[]>>(() => `/api/orgs/${toValue(slug)}/findings/attachments`, {
    query: computed(() => ({ ids: ids.value })),
    default: () => ({}),
  })
  return {
    /** The finding's stored images ([] while loading or when it has none). */
    imagesOf: (findingId: string): Attachment[] => data.value?.[findingId] ?? [],
    /** The attachments URL of a finding, for thumbnails' links. */
    baseOf: (findingId: string) => `/api/orgs/${toValue(slug)}/findings/${findingId}/attachments`,
  }
}
