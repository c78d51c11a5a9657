// Domain events inside one server process: services emit them after their transaction
// has committed; the forecast jobs, at-risk checks and other follow-ups listen.
// Listeners run asynchronously; a failing listener is logged and never fails the emitter.
// Anything that must survive a crash is written to the database by the listener (job rows);
// the nightly refresh and the start-up staleness sweep catch what a crash interrupted.

export interface DomainEvents {
  /** A field was created, edited or deleted. */
  'field.changed': { fieldId: number; farmId: number; deleted: boolean }
  /** A farm's obstructions changed (created, edited, deleted). */
  'obstructions.changed': { farmId: number }
  /** A farm's elevation model was uploaded, replaced or removed. */
  'terrain.changed': { farmId: number }
  /** Orbit data changed: a set uploaded or fetched, the active sets or constellations switched. */
  'orbits.changed': { reason: string }
  /** Satellite outages entered, edited or removed, over this span (UTC ms). */
  'outages.changed': { satIds: string[]; fromMs: number; toMs: number }
  /** Work types or service levels changed. */
  'planning.changed': { serviceLevelIds: number[] | 'all' }
  /** A field's stored forecast was replaced by a finished job. */
  'forecast.stored': { fieldId: number; jobId: number }
}

export type DomainEventName = keyof DomainEvents
type Listener<K extends DomainEventName> = (payload: DomainEvents[K]) => void | Promise<void>

const listeners = new Map<DomainEventName, Set<Listener<DomainEventName>>>()
let onListenerError: (name: string, error: unknown) => void = (name, error) =>
  console.error(`[skyfurrow] listener of ${name} failed:`, error)

/** Registers a listener; returns a function that removes it. */
export function on<K extends DomainEventName>(name: K, listener: Listener<K>): () => void {
  let set = listeners.get(name)
  if (!set) listeners.set(name, (set = new Set()))
  set.add(listener as Listener<DomainEventName>)
  return () => set.delete(listener as Listener<DomainEventName>)
}

/**
 * Emits an event to every listener. Returns a promise that settles when all listeners
 * have finished (callers usually do not wait; tests may).
 */
export function emit<K extends DomainEventName>(name: K, payload: DomainEvents[K]): Promise<void> {
  const set = listeners.get(name)
  if (!set || set.size === 0) return Promise.resolve()
  return Promise.all(
    [...set].map(async (listener) => {
      try {
        await listener(payload)
      } catch (error) {
        onListenerError(name, error)
      }
    }),
  ).then(() => undefined)
}

/** Replaces the error reporter (the app passes its logger). */
export function setListenerErrorHandler(handler: (name: string, error: unknown) => void): void {
  onListenerError = handler
}

/** Removes every listener (between tests). */
export function clearListeners(): void {
  listeners.clear()
}
