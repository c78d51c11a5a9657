import type { PassStatus } from '@shared/schemas/passes'

/** The words for a pass's status. */
export const passStatusLabels: Record<PassStatus, string> = {
  planned: 'Planned',
  confirmed: 'Confirmed',
  started: 'Started',
  done: 'Done',
  cancelled: 'Cancelled',
}

/** Tag colours for statuses: neutral for planned, the brand green for confirmed, muted for the rest. */
export const passStatusColours: Record<PassStatus, string> = {
  planned: 'default',
  confirmed: 'geekblue',
  started: 'gold',
  done: 'default',
  cancelled: '',
}
