// Satellite positions shared by the fields of a run: every field of one window is computed
// on the same epoch grid from the same orbit data, so the engine worker propagates each
// (orbit data, chunk of epochs) once and reuses the positions for the next fields. Keyed
// by a SHA-1 digest of the satellites (ids, systems, orbit elements) and the epoch grid,
// so a new orbit set, other constellations or another window never meet an old entry.
// The least recently used entry goes first; the default size holds two weeks of 24-hour
// chunks (102 satellites x 288 epochs x 3 doubles = 0.7 MB a chunk).
import { createHash } from 'node:crypto'
import type { Satellite } from '../../shared/precision/orbits/types.ts'
import type { PositionCache } from '../../shared/precision/propagation.ts'

export class PositionMemo implements PositionCache {
  private readonly entries = new Map<string, Float64Array>()
  hits = 0
  misses = 0

  constructor(private readonly maxEntries = 16) {}

  private key(sats: readonly Satellite[], epochsMs: ArrayLike<number>): string {
    const n = epochsMs.length
    const grid = n === 0 ? '0' : `${epochsMs[0]}:${n}:${n > 1 ? epochsMs[1] - epochsMs[0] : 0}:${epochsMs[n - 1]}`
    return createHash('sha1').update(JSON.stringify(sats)).update(grid).digest('base64')
  }

  get(sats: readonly Satellite[], epochsMs: ArrayLike<number>): Float64Array | undefined {
    const k = this.key(sats, epochsMs)
    const hit = this.entries.get(k)
    if (hit) {
      this.entries.delete(k)
      this.entries.set(k, hit)
      this.hits++
    } else this.misses++
    return hit
  }

  set(sats: readonly Satellite[], epochsMs: ArrayLike<number>, positions: Float64Array): void {
    this.entries.set(this.key(sats, epochsMs), positions)
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value!)
  }

  get size(): number {
    return this.entries.size
  }
}
