// The API contract of the cab view: the signed-in crew member's week, everything the page
// needs to work without signal (passes, the hour states of each pass's work type on its
// field with each hour's night flag, the field shapes), fetched in one request and kept on
// the device.
import type { Boundary } from './geo'
import type { Pass } from './passes'

export interface CrewHour {
  /** UTC hour start */
  startMs: number
  state: 'clear' | 'tight' | 'closed'
  /**
   * a night hour at the field's centroid (shared/planning/night.ts), computed by the
   * server; a week kept by an older version of the page has none (shared/planning/crew.ts
   * `nightFlagged` fills it in)
   */
  night: boolean
}

export interface CrewPass extends Pass {
  boundary: Boundary
  centroid: { latDeg: number; lonDeg: number }
  /** stored forecast hours of the field for the pass's work type over the week */
  hours: CrewHour[]
}

export interface CrewWeek {
  /** when the server put this together (the page shows "data as of") */
  generatedAt: string
  from: string
  to: string
  user: { id: number; name: string }
  machines: Array<{ id: number; name: string; crew: string }>
  passes: CrewPass[]
}
