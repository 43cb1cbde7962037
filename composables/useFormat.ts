/** Date formatting in the signed-in person's time zone (from their preferences). */
export function useFormat() {
  const prefs = usePreferencesStore()

  function format(iso: string | Date | null | undefined, options: Intl.DateTimeFormatOptions) {
    if (!iso) return '—'
    const date = new Date(iso)
    if (Number.isNaN(date.getTime())) return '—'
    try {
      return new Intl.DateTimeFormat('en-GB', { ...options, timeZone: prefs.timeZone }).format(date)
    } catch {
      return new Intl.DateTimeFormat('en-GB', options).format(date)
    }
  }

  return {
    date: (iso: string | Date | null | undefined) => format(iso, { day: 'numeric', month: 'short', year: 'numeric' }),
    dateTime: (iso: string | Date | null | undefined) =>
      format(iso, { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZoneName: 'short' }),
  }
}
