import type { Role } from '@shared/schemas'
import { pageRoles, RouteNames, type RouteName } from './names'

export interface NavLink {
  name: RouteName
  label: string
  /** One line under the label in the side navigation. */
  hint: string
}

export interface NavSection {
  /** Heading above a group of links (the Admin group), or null for the main list. */
  heading: string | null
  links: NavLink[]
}

type NavPageName = keyof typeof pageRoles

const mainLinks: (NavLink & { name: NavPageName })[] = [
  { name: RouteNames.outlook, label: 'Outlook', hint: 'Precision week ahead' },
  { name: RouteNames.fields, label: 'Fields', hint: 'Boundaries and tree lines' },
  { name: RouteNames.passes, label: 'Passes', hint: 'Scheduled field work' },
  { name: RouteNames.cab, label: 'In the cab', hint: 'My passes, also offline' },
  { name: RouteNames.plans, label: 'Plans', hint: 'Weekly e-mails to clients' },
  { name: RouteNames.orbits, label: 'Orbits', hint: 'Satellite data and outages' },
  { name: RouteNames.corrections, label: 'Corrections', hint: 'RTK bases, networks, space weather' },
]

const adminLinks: (NavLink & { name: NavPageName })[] = [
  { name: RouteNames.adminFarms, label: 'Farms', hint: 'Farms and their clients' },
  { name: RouteNames.adminUsers, label: 'Users', hint: 'Accounts and roles' },
  { name: RouteNames.adminWorkTypes, label: 'Work types', hint: 'Precision each job needs' },
  { name: RouteNames.adminServiceLevels, label: 'Service levels', hint: 'Correction services' },
  { name: RouteNames.adminMachines, label: 'Machines', hint: 'Tractors, crews, antennas' },
  { name: RouteNames.jobs, label: 'Forecast jobs', hint: 'Recomputes and their progress' },
]

const mailboxLink: NavLink & { name: NavPageName } = {
  name: RouteNames.mailbox,
  label: 'Mailbox',
  hint: 'Mail caught by the local server',
}

function allowed(role: Role, name: NavPageName): boolean {
  return (pageRoles[name] as readonly Role[]).includes(role)
}

/**
 * The navigation a role sees. The same `pageRoles` table guards the routes, so a link
 * is shown exactly when its page would open.
 */
export function navigationFor(role: Role, options: { fakeMailbox: boolean }): NavSection[] {
  const sections: NavSection[] = [{ heading: null, links: mainLinks.filter((l) => allowed(role, l.name)) }]
  const admin = adminLinks.filter((l) => allowed(role, l.name))
  if (admin.length > 0) sections.push({ heading: 'Admin', links: admin })
  if (options.fakeMailbox && allowed(role, mailboxLink.name)) {
    sections.push({ heading: 'Local mail', links: [mailboxLink] })
  }
  return sections
}
