import { describe, expect, it } from 'vitest'
import { assertFarmVisible, canSeeFarm, visibleFarmIds } from '../../../server/auth/access.ts'
import { HttpError } from '../../../server/http/errors.ts'

describe('farm access', () => {
  const client = { role: 'client' as const, farmIds: [3, 5] }
  const office = { role: 'office' as const, farmIds: [] }

  it('restricts clients to their linked farms', () => {
    expect(visibleFarmIds(client)).toEqual([3, 5])
    expect(canSeeFarm(client, 3)).toBe(true)
    expect(canSeeFarm(client, 4)).toBe(false)
  })

  it('lets every other role see every farm', () => {
    for (const role of ['admin', 'office', 'contractor'] as const) {
      expect(visibleFarmIds({ role, farmIds: [] })).toBeUndefined()
      expect(canSeeFarm({ role, farmIds: [] }, 99)).toBe(true)
    }
    expect(() => assertFarmVisible(office, 42)).not.toThrow()
  })

  it('answers a hidden farm with 404, not 403', () => {
    try {
      assertFarmVisible(client, 4)
      expect.unreachable()
    } catch (error) {
      expect((error as HttpError).status).toBe(404)
    }
  })
})
