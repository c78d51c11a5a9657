// Small server helpers of the planning pages: CSV fields (RFC 4180), the passes CSV in the
// user's units, runs of Clear hours for calendar feeds, the worst sample point of an hour.
import { describe, expect, it } from 'vitest'
import type { PassDetailRow } from '../../../server/db/repositories/passes.ts'
import { clearRuns } from '../../../server/services/calendar.ts'
import { HA_PER_ACRE, csvField, passesCsvText } from '../../../server/services/exports.ts'
import { worstPointIndex } from '../../../server/services/hourDetail.ts'

const H = 3_600_000

describe('csvField', () => {
  it('quotes what RFC 4180 says must be quoted, doubling quotes', () => {
    expect(csvField('plain')).toBe('plain')
    expect(csvField('a,b')).toBe('"a,b"')
    expect(csvField('say "when"')).toBe('"say ""when"""')
    expect(csvField('two\r\nlines')).toBe('"two\r\nlines"')
    expect(csvField(null)).toBe('')
  })

  it('keeps spreadsheet formulas from running (common practice)', () => {
    expect(csvField('=SUM(A1:A3)')).toBe("'=SUM(A1:A3)")
    expect(csvField('+1 555')).toBe("'+1 555")
    expect(csvField('-12.5', false)).toBe('-12.5')
  })
})

describe('passesCsvText', () => {
  const row = {
    id: 1, fieldId: 2, workTypeId: 3, machineId: 4, startAt: new Date(Date.UTC(2026, 10, 1, 6)), durationMin: 150,
    status: 'planned', atRisk: false, atRiskReason: null, suggestedStartAt: null, notes: 'edge, north', createdBy: null,
    createdAt: new Date(), updatedAt: new Date(), farmId: 5, farmName: 'Farm', timeZone: 'America/Chicago',
    fieldName: 'Creek Bottom', fieldAreaHa: 40.468564224, workTypeName: 'Tile drainage', requireN1: true, machineName: 'Plow', crew: 'Crew',
  } as PassDetailRow

  it('writes farm-local times across the fall-back night and the area in the chosen unit', () => {
    const [header, line] = passesCsvText([row], 'imperial').replace(/^\uFEFF/, '').split('\r\n')
    expect(header.split(',')).toContain('Area (ac)')
    // 01:00 CDT + 2 h 30 min = 02:30 CST (2026-11-01, US fall-back).
    expect(line.startsWith('2026-11-01 01:00 CDT,2026-11-01 02:30 CST,America/Chicago,2026-11-01T06:00:00.000Z,Creek Bottom,100.00,')).toBe(true)
    expect(line.endsWith(',"edge, north"')).toBe(true)
    const metric = passesCsvText([row], 'metric').split('\r\n')
    expect(metric[0]).toContain('Area (ha)')
    expect(metric[1]).toContain(',40.47,')
    // 1 ac = 4046.8564224 m^2 (NIST Handbook 44, Appendix C)
    expect(HA_PER_ACRE * 10_000).toBeCloseTo(4046.8564224, 7)
  })
})

describe('clearRuns', () => {
  it('merges adjacent Clear hours and skips the rest', () => {
    const t = Date.UTC(2026, 11, 3)
    const hours = ['clear', 'clear', 'tight', 'clear', 'closed', 'clear', 'clear', 'clear'].map((state, i) => ({ startMs: t + i * H, state: state as 'clear' }))
    expect(clearRuns([...hours].reverse())).toEqual([
      { startMs: t, endMs: t + 2 * H },
      { startMs: t + 3 * H, endMs: t + 4 * H },
      { startMs: t + 5 * H, endMs: t + 8 * H },
    ])
    // a gap in the stored hours ends a run
    expect(clearRuns([{ startMs: t, state: 'clear' }, { startMs: t + 2 * H, state: 'clear' }])).toHaveLength(2)
  })
})

describe('worstPointIndex', () => {
  it('takes a point without a fix first, then the highest HDOP', () => {
    expect(worstPointIndex([{ hdopMax: 1.1, noFixShare: 0 }, { hdopMax: 2.4, noFixShare: 0 }, { hdopMax: 1.9, noFixShare: 0 }])).toBe(1)
    expect(worstPointIndex([{ hdopMax: 3, noFixShare: 0 }, { hdopMax: null, noFixShare: 1 }])).toBe(1)
    expect(worstPointIndex([{ hdopMax: 9, noFixShare: 0 }, { hdopMax: 1.2, noFixShare: 0.2 }])).toBe(1)
  })
})
