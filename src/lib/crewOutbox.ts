/**
 * What the cab view keeps on the device (IndexedDB through idb-keyval): the last crew week
 * the server sent, and the outbox of status changes and notes made while offline. Keys
 * carry the user id, so two people sharing a tablet never see or send each other's.
 *
 * The outbox is a list in the order the changes were made; `version` is the pass version
 * the change was made from (the server refuses it with 409 when the pass has changed).
 * A week kept by an older version of the page has hours without their night flag; it is
 * read with the flag filled in by the same rule (shared/planning/crew.ts `nightFlagged`).
 */
import { createStore, del, get, set, type UseStore } from 'idb-keyval'
import { nightFlagged, type CrewReadingHour } from '@shared/planning'
import type { CrewPass, CrewWeek } from '@shared/schemas/crew'
import type { PassStatus } from '@shared/schemas/passes'

export interface SavedWeek {
  week: CrewWeek
  /** when the device received it (ms) */
  savedAtMs: number
}

export interface OutboxItem {
  /** unique per change */
  key: string
  passId: number
  kind: 'status' | 'note'
  status?: PassStatus
  note: string
  /** the pass version the change was made from; null: apply whatever the pass is now */
  version: number | null
  queuedAtMs: number
  /** why the server refused it (a conflict or a rule); the crew decides what to do */
  problem?: string
}

let store: UseStore | undefined
function db(): UseStore {
  store ??= createStore('skyfurrow-cab', 'kv')
  return store
}

const weekKey = (userId: number) => `week:${userId}`
const outboxKey = (userId: number) => `outbox:${userId}`

/** A week as any version of the page kept it: the hours' night flags may be missing. */
type KeptWeek = Omit<CrewWeek, 'passes'> & { passes: Array<Omit<CrewPass, 'hours'> & { hours: CrewReadingHour[] }> }

export async function loadWeek(userId: number): Promise<SavedWeek | undefined> {
  const kept = await get<{ week: KeptWeek; savedAtMs: number }>(weekKey(userId), db())
  if (!kept) return undefined
  const passes = kept.week.passes.map((p) => ({ ...p, hours: nightFlagged(p.hours, p.centroid) }))
  return { savedAtMs: kept.savedAtMs, week: { ...kept.week, passes } }
}
export const saveWeek = (userId: number, saved: SavedWeek) => set(weekKey(userId), saved, db())
export const loadOutbox = async (userId: number) => (await get<OutboxItem[]>(outboxKey(userId), db())) ?? []
export const saveOutbox = (userId: number, items: OutboxItem[]) =>
  items.length ? set(outboxKey(userId), items, db()) : del(outboxKey(userId), db())

/** A key that is unique enough for one device's outbox. */
export function newKey(nowMs: number): string {
  return `${nowMs.toString(36)}-${Math.random().toString(36).slice(2, 10)}`
}
