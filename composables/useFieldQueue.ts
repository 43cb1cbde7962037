import { useFieldQueueStore, type FieldRecord, type FieldRecordKind, type SendOutcome } from '~/stores/field-queue'

/**
 * The field screen's outbox for one survey: saves checks, findings and site conditions through the device queue,
 * sends them when the connection returns (the `online` event) or when asked, and tells the page what is waiting.
 * `onSent` runs after a background send got something through, so the page can reload the survey.
 */
export function useFieldQueue(org: Ref<string> | ComputedRef<string>, surveyId: Ref<string> | ComputedRef<string>, onSent?: () => unknown) {
  const queue = useFieldQueueStore()
  const records = computed(() => queue.forSurvey(surveyId.value))
  const waiting = computed(() => queue.waitingCount(surveyId.value))
  const refused = computed(() => queue.refusedCount(surveyId.value))
  const online = computed(() => queue.online)
  const sending = computed(() => queue.flushing)
  const deviceUnavailable = computed(() => queue.deviceUnavailable)

  async function sendNow() {
    const tally = await queue.flush()
    if (tally.sent > 0) await onSent?.()
    return tally
  }

  function goneOnline() {
    queue.setOnline(true)
    void sendNow()
  }
  function goneOffline() {
    queue.setOnline(false)
  }

  onMounted(async () => {
    window.addEventListener('online', goneOnline)
    window.addEventListener('offline', goneOffline)
    await queue.load()
    // Whatever an earlier visit left waiting goes out as soon as the page opens with a connection.
    if (navigator.onLine && queue.waitingCount(surveyId.value) > 0) await sendNow()
  })
  onBeforeUnmount(() => {
    window.removeEventListener('online', goneOnline)
    window.removeEventListener('offline', goneOffline)
  })

  const path = (what: string) => `/api/orgs/${org.value}/surveys/${surveyId.value}/${what}`
  const urls: Record<FieldRecordKind, string> = { check: 'checks', finding: 'findings', conditions: 'conditions' }

  /** Keeps the record on the device and sends it if possible; `key` re-sends a fixed, refused record under its key. */
  function save<T = unknown>(kind: FieldRecordKind, subjectId: string, label: string, body: Record<string, unknown>, key?: string): Promise<SendOutcome<T>> {
    return queue.save<T>({ kind, org: org.value, surveyId: surveyId.value, subjectId, label, url: path(urls[kind]), body, key })
  }

  /** Records waiting or refused about one asset or site, for a marker beside it. */
  function about(subjectId: string): FieldRecord[] {
    return records.value.filter((r) => r.subjectId === subjectId)
  }

  return {
    records, waiting, refused, online, sending, deviceUnavailable, sendNow, save, about,
    retry: (key: string) => queue.retry(key).then(() => onSent?.()),
    discard: (key: string) => queue.discard(key),
  }
}
