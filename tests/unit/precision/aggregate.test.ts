import { describe, expect, it } from 'vitest'
import { weightedMedian } from '@shared/precision/aggregate'

/** Reference weighted median by full sort: smallest value whose cumulative weight reaches half. */
function sortedWeightedMedian(values: number[], weights: number[]): number {
  const idx = values.map((_, i) => i).sort((a, b) => (Number.isNaN(values[a]) ? Infinity : values[a]) - (Number.isNaN(values[b]) ? Infinity : values[b]))
  const total = weights.reduce((a, b) => a + b, 0)
  let acc = 0
  for (const i of idx) {
    acc += weights[i]
    if (acc >= total / 2) return Number.isNaN(values[i]) ? Infinity : values[i]
  }
  return Infinity
}

describe('weighted median (quickselect) used for the hourly medians', () => {
  it('equals the sort-based definition on random data with ties and no-fix (NaN) samples', () => {
    // Definition of the weighted median: the smallest x with sum of weights of values <= x
    // at least half the total (the lower weighted median).
    let seed = 7
    const rand = () => ((seed = (seed * 16807) % 2147483647) - 1) / 2147483646
    for (let trial = 0; trial < 500; trial++) {
      const n = 1 + Math.floor(rand() * 300)
      const values = Array.from({ length: n }, () => (rand() < 0.05 ? NaN : Math.round(rand() * 40) / 10))
      const weights = Array.from({ length: n }, () => rand())
      const expected = sortedWeightedMedian(values, weights)
      expect(weightedMedian(Float64Array.from(values), Float64Array.from(weights), n)).toBe(expected)
    }
  })

  it('equal weights: the lower median of the values', () => {
    expect(weightedMedian(Float64Array.of(5, 1, 3, 2), Float64Array.of(1, 1, 1, 1), 4)).toBe(2)
    expect(weightedMedian(Float64Array.of(5, 1, 3), Float64Array.of(1, 1, 1), 3)).toBe(3)
  })
})
