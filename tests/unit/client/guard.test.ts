import { describe, expect, it } from 'vitest'
import type { RouteMeta } from 'vue-router'
import type { Role, SessionUser } from '@shared/schemas'
import { decideNavigation, safeNext } from '@/router/guard'
import '@/router/meta'

const user = (role: Role): SessionUser => ({ id: 1, email: `${role}@x.test`, name: role, role, units: 'metric', farmIds: [] })
const to = (meta: RouteMeta, fullPath = '/somewhere') => ({ meta, fullPath, name: undefined })

describe('decideNavigation', () => {
  it('sends a signed-out visitor to sign-in and remembers where they were going', () => {
    expect(decideNavigation(to({ title: 'Passes', roles: ['client'] }, '/passes?week=2'), { user: null, fakeMailbox: false }))
      .toEqual({ name: 'sign-in', query: { next: '/passes?week=2' } })
  })

  it('lets anyone open public pages', () => {
    expect(decideNavigation(to({ title: 'About', public: true }), { user: null, fakeMailbox: false })).toBe(true)
  })

  it('sends a signed-in user away from the sign-in page', () => {
    expect(decideNavigation(to({ title: 'Sign in', public: true, guestOnly: true }), { user: user('client'), fakeMailbox: false }))
      .toEqual({ name: 'outlook' })
  })

  it('refuses a page that is not for the role, saying which page', () => {
    expect(decideNavigation(to({ title: 'Users', roles: ['admin'] }, '/admin/users'), { user: user('client'), fakeMailbox: true }))
      .toEqual({ name: 'not-allowed', query: { from: '/admin/users' } })
    expect(decideNavigation(to({ title: 'Users', roles: ['admin'] }), { user: user('admin'), fakeMailbox: true })).toBe(true)
  })

  it('keeps the Mailbox closed while mail goes to a real server', () => {
    const meta: RouteMeta = { title: 'Mailbox', roles: ['admin', 'office'], needsFakeMailbox: true }
    expect(decideNavigation(to(meta, '/mailbox'), { user: user('office'), fakeMailbox: false }))
      .toEqual({ name: 'not-allowed', query: { from: '/mailbox', reason: 'mailbox' } })
    expect(decideNavigation(to(meta), { user: user('office'), fakeMailbox: true })).toBe(true)
  })
})

describe('safeNext', () => {
  it('follows paths on this site only', () => {
    expect(safeNext('/fields?farm=2')).toBe('/fields?farm=2')
    expect(safeNext('//evil.example/x')).toBeNull()
    expect(safeNext('/\\evil.example')).toBeNull()
    expect(safeNext('https://evil.example')).toBeNull()
    expect(safeNext('/sign-in?next=/x')).toBeNull()
    expect(safeNext(['/a'])).toBeNull()
  })
})
