const FORMAT = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' })

/** A calendar date (YYYY-MM-DD, no time of day) in words, the same day in every time zone. */
export function formatCalendarDate(iso: string | null | undefined): string {
  if (!iso || !/^\d{4}-\d{2}-\d{2}$/.test(iso)) return '—'
  return FORMAT.format(new Date(`${iso}T00:00:00Z`))
}
