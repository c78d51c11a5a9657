import type { CrewWeek } from '@shared/schemas/crew'
import type { Pass, PassNote, PassStatusChange } from '@shared/schemas/passes'
import { http } from './http'

/** The signed-in crew member's week (no toast when offline: the cab view says so). */
export const fetchCrewWeek = () => http.get<CrewWeek>('/crew/week', undefined, { quietNetwork: true })

/** Status changes and notes from the cab: the queue shows conflicts and failures itself. */
const queued = { quietNetwork: true, quiet: [400, 403, 404, 409] }

export const sendPassStatus = (passId: number, change: Partial<PassStatusChange> & Pick<PassStatusChange, 'status'>) =>
  http.post<Pass>(`/passes/${passId}/status`, change, queued)

export const sendPassNote = (passId: number, note: PassNote) => http.post<Pass>(`/passes/${passId}/notes`, note, queued)
