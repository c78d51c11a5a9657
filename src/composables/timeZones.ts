/** IANA time-zone names the browser knows, for the farm form's select. */
export function timeZoneOptions(): { value: string; label: string }[] {
  const names: string[] =
    typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : ['UTC']
  // Some browsers leave UTC out of the list; farms may still use it.
  if (!names.includes('UTC')) names.push('UTC')
  return names.map((value) => ({ value, label: value.replaceAll('_', ' ') }))
}

/** The browser's own time zone: the default for a new farm. */
export function localTimeZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC'
}

/** The current local time at a farm, e.g. "Tue 14:05 (UTC−05:00)". */
export function farmLocalTime(timeZone: string, now: Date = new Date()): string {
  try {
    return new Intl.DateTimeFormat('en-GB', {
      timeZone,
      weekday: 'short',
      hour: '2-digit',
      minute: '2-digit',
      timeZoneName: 'shortOffset',
    }).format(now)
  } catch {
    return '—'
  }
}
