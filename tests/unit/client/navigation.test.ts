import { describe, expect, it } from 'vitest'
import type { Role } from '@shared/schemas'
import { navigationFor } from '@/router/navigation'
import { pageRoles, RouteNames } from '@/router/names'

function labels(role: Role, fakeMailbox: boolean): string[] {
  return navigationFor(role, { fakeMailbox }).flatMap((s) => s.links.map((l) => l.label))
}

describe('navigation by role', () => {
  it('shows a farm client only the Outlook, Passes and the correction sources of their farms', () => {
    expect(labels('client', true)).toEqual(['Outlook', 'Passes', 'Corrections'])
  })

  it('shows a contractor the Outlook, Fields, Passes, the cab view and Corrections', () => {
    expect(labels('contractor', true)).toEqual(['Outlook', 'Fields', 'Passes', 'In the cab', 'Corrections'])
  })

  it('shows office staff everything except farm and user management', () => {
    expect(labels('office', true)).toEqual([
      'Outlook', 'Fields', 'Passes', 'In the cab', 'Plans', 'Orbits', 'Corrections', 'Work types', 'Service levels', 'Machines', 'Forecast jobs', 'Mailbox',
    ])
  })

  it('shows an admin every page, grouped under an Admin heading', () => {
    const sections = navigationFor('admin', { fakeMailbox: true })
    expect(sections.map((s) => s.heading)).toEqual([null, 'Admin', 'Local mail'])
    expect(labels('admin', true)).toEqual([
      'Outlook', 'Fields', 'Passes', 'In the cab', 'Plans', 'Orbits', 'Corrections', 'Farms', 'Users', 'Work types', 'Service levels', 'Machines', 'Forecast jobs',
      'Mailbox',
    ])
  })

  it('hides the Mailbox while mail goes to a real server', () => {
    expect(labels('admin', false)).not.toContain('Mailbox')
    expect(labels('office', false)).not.toContain('Mailbox')
  })

  it('never links a page the role may not open', () => {
    for (const role of ['admin', 'office', 'contractor', 'client'] as const) {
      for (const link of navigationFor(role, { fakeMailbox: true }).flatMap((s) => s.links)) {
        const allowed = pageRoles[link.name as keyof typeof pageRoles] as readonly Role[]
        expect(allowed, `${role} -> ${link.name}`).toContain(role)
      }
    }
    expect(pageRoles[RouteNames.adminUsers]).toEqual(['admin'])
  })
})
