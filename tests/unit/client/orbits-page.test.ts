// Pure helpers of the Orbits page: refused-upload problems read from the error's fields,
// element ages in words.
import { describe, expect, it } from 'vitest'
import { formatAgeDays, problemsFromFields } from '@/views/orbits/problems'

describe('problemsFromFields', () => {
  it('reads record, line, satellite and message, in record order, leaving out the file sentence', () => {
    const rows = problemsFromFields({
      file: 'No record in the file could be used (2 refused): ...',
      'record 10': 'line 29: line 1 is missing',
      'record 2': 'line 6 (GPS TEST GA2 (PRN 02)): line 2 checksum is 5, computed 4',
    })
    expect(rows).toEqual([
      { record: 'record 2 (GPS TEST GA2 (PRN 02))', line: 6, message: 'line 2 checksum is 5, computed 4' },
      { record: 'record 10', line: 29, message: 'line 1 is missing' },
    ])
  })

  it('keeps a message it cannot split as it is', () => {
    expect(problemsFromFields({ 'record 1': 'unreadable' })).toEqual([{ record: 'record 1', line: 0, message: 'unreadable' }])
    expect(problemsFromFields(undefined)).toEqual([])
  })
})

describe('formatAgeDays', () => {
  it('says hours below a day, one decimal below ten days, whole days above', () => {
    expect(formatAgeDays(0.25)).toBe('6 hours')
    expect(formatAgeDays(1)).toBe('1 day')
    expect(formatAgeDays(1.64)).toBe('1.6 days')
    expect(formatAgeDays(12.4)).toBe('12 days')
    expect(formatAgeDays(null)).toBe('—')
  })
})
