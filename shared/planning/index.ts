// Pure planning logic shared by the server and the client: find a window, the at-risk
// check, pass duration estimates and farm-local time helpers. No I/O and no clock: the
// current time is always passed in.
export { findWindows, compareWindows, hoursCovered } from './windows'
export type { FindWindowsInput, FoundWindow, PlanningHour, PlanningHourState } from './windows'
export { passRisk, coveredHours, requiresClear } from './risk'
export type { RiskInput, RiskResult } from './risk'
export { estimateDurationMin, DURATION_STEP_MIN } from './duration'
export { isNightHour, sunAltitudeDeg, sunTimes, SUN_HORIZON_DEG } from './night'
export type { GeoPoint, SunTimes } from './night'
export {
  HOUR_MS,
  MINUTE_MS,
  ceilHour,
  checkZone,
  comingWeek,
  floorHour,
  localDate,
  localDayHours,
  localLabel,
  localStamp,
  overlaps,
} from './time'
export type { TimeSpan } from './time'
export { nightFlagged, openSpan, plannedAtNight, workable } from './crew'
export type { CrewReadingHour, OpenSpan, OpenSpanRule } from './crew'
