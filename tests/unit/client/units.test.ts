// The client's one units module (src/lib/units.ts): the conversion factors against their
// published definitions, and the form conversions and formats of the planning and field pages.
//
// Source of the factors: NIST Special Publication 811 (2008 edition), "Guide for the Use of
// the International System of Units (SI)", Appendix B.8 (factors for units listed
// alphabetically): foot = 3.048 E-01 m (exact), inch = 2.54 E-02 m (exact), square foot =
// 9.290 304 E-02 m^2 (exact), foot (U.S. survey) = 1200/3937 m, acre (based on U.S. survey
// foot) = 4.046 873 E+03 m^2. The table entries are quoted from memory. An acre is
// 43 560 square feet (the same appendix); the module uses the international acre.
import { describe, expect, it } from 'vitest'
import {
  CM_PER_IN,
  HA_PER_AC,
  M_PER_FT,
  M_PER_IN,
  formatHeight,
  formatLength,
  formatRate,
  formatSmall,
  formatSmallArea,
  fromHeight,
  fromRate,
  fromSmall,
  heightInBox,
  keepOrConvert,
  toHeight,
  toRate,
  toSmall,
} from '@/lib/units'

describe('conversion factors (NIST SP 811 (2008), Appendix B.8)', () => {
  it('uses the exact international foot and inch', () => {
    // foot = 3.048 E-01 m; inch = 2.54 E-02 m = 2.54 cm; 12 in = 1 ft.
    expect(M_PER_FT).toBe(3.048e-1)
    expect(CM_PER_IN).toBe(2.54)
    expect(M_PER_IN).toBe(2.54e-2)
    expect(12 * M_PER_IN).toBeCloseTo(M_PER_FT, 15)
  })

  it('uses the international acre: 43 560 square feet of the international foot', () => {
    // square foot = 9.290 304 E-02 m^2 (exact); 43 560 ft^2 = 4 046.856 4224 m^2 = 0.404 685 642 24 ha.
    expect(M_PER_FT * M_PER_FT).toBeCloseTo(9.290304e-2, 15)
    expect((43_560 * M_PER_FT * M_PER_FT) / 10_000).toBeCloseTo(HA_PER_AC, 14)
    // Not the acre of the U.S. survey foot (1200/3937 m), which the appendix lists as
    // 4.046 873 E+03 m^2: the two differ by about 0.016 m^2 (4 parts in a million).
    const surveyAcreM2 = 43_560 * (1200 / 3937) ** 2
    expect(surveyAcreM2).toBeCloseTo(4046.873, 3)
    expect(surveyAcreM2 - HA_PER_AC * 10_000).toBeGreaterThan(0.015)
    expect(surveyAcreM2 - HA_PER_AC * 10_000).toBeLessThan(0.017)
  })
})

describe('form values in the user’s units', () => {
  it('turns small lengths (sigma, limits) into cm or in and back', () => {
    expect(toSmall(0.0254, 'imperial')).toBe(1)
    expect(fromSmall(1, 'imperial')).toBe(0.0254)
    expect(toSmall(0.012, 'metric')).toBe(1.2)
    expect(fromSmall(1.2, 'metric')).toBe(0.012)
    // 5 cm = 1.9685 in, shown to three decimals.
    expect(toSmall(0.05, 'imperial')).toBe(1.969)
  })

  it('turns heights and work rates into the user’s units and back', () => {
    expect(toHeight(3.048, 'imperial')).toBe(10)
    expect(fromHeight(10, 'imperial')).toBe(3.048)
    // 3.5 m = 11.483 ft: two decimals in a machine's form, a tenth in an antenna's box.
    expect(toHeight(3.5, 'imperial')).toBe(11.48)
    expect(heightInBox(3.5, 'imperial')).toBe(11.5)
    expect(heightInBox(3.51, 'metric')).toBe(3.51)
    // 11.5 ft = 3.5052 m, kept to the centimetre by the boxes of the field pages.
    expect(fromHeight(11.5, 'imperial', 2)).toBe(3.51)
    // 10 ac/h = 4.046 856 ha/h, stored to four decimals.
    expect(toRate(10 * HA_PER_AC, 'imperial')).toBe(10)
    expect(fromRate(10, 'imperial')).toBe(4.0469)
    expect(fromRate(6, 'metric')).toBe(6)
  })

  it('keeps the stored value when a form is saved unchanged in other units', () => {
    const to = (m: number) => toSmall(m, 'imperial')
    const from = (v: number) => fromSmall(v, 'imperial')
    // 5 cm shows as 1.969 in; saving 1.969 unchanged keeps 5 cm, not 5.0013 cm.
    expect(keepOrConvert(1.969, 0.05, to, from)).toBe(0.05)
    expect(from(1.969)).toBe(0.050013)
    expect(keepOrConvert(2, 0.05, to, from)).toBe(0.0508)
    expect(keepOrConvert(2, null, to, from)).toBe(0.0508)
    expect(keepOrConvert(null, 0.05, to, from)).toBeUndefined()
  })
})

describe('formats', () => {
  it('writes sigma and limits in cm or m, in or ft', () => {
    expect(formatSmall(0.012, 'metric')).toBe('1.2 cm')
    expect(formatSmall(3, 'metric')).toBe('3 m')
    // 1.2 cm = 0.472 in: two decimals below one inch.
    expect(formatSmall(0.012, 'imperial')).toBe('0.47 in')
    expect(formatSmall(0.8, 'imperial')).toBe('31.5 in')
    // 3 m = 9.84 ft (from 36 in up, feet).
    expect(formatSmall(3, 'imperial')).toBe('9.8 ft')
    expect(formatSmall(null, 'metric')).toBe('—')
  })

  it('writes heights, lengths, small areas and rates', () => {
    expect(formatHeight(3.5, 'imperial', 1)).toBe('11.5 ft')
    expect(formatHeight(3.5, 'imperial')).toBe('11 ft')
    expect(formatHeight(3.4, 'metric', 1)).toBe('3.4 m')
    // 100 m = 328.08 ft; 100 m^2 = 1 076.39 ft^2.
    expect(formatLength(100, 'imperial')).toBe('328 ft')
    expect(formatLength(99.6, 'metric')).toBe('100 m')
    expect(formatSmallArea(100, 'imperial')).toBe('1076 sq ft')
    expect(formatSmallArea(100, 'metric')).toBe('100 m²')
    // 6 ha/h = 14.83 ac/h.
    expect(formatRate(6, 'imperial')).toBe('14.8 ac/h')
    expect(formatRate(6, 'metric')).toBe('6 ha/h')
  })
})
