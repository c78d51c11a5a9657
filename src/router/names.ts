import type { Role } from '@shared/schemas'

/** Every route name in one place, so links and guards cannot drift from the routes. */
export const RouteNames = {
  signIn: 'sign-in',
  forgotPassword: 'forgot-password',
  resetPassword: 'reset-password',
  about: 'about',
  notFound: 'not-found',
  notAllowed: 'not-allowed',
  outlook: 'outlook',
  fields: 'fields',
  passes: 'passes',
  cab: 'cab',
  plans: 'plans',
  orbits: 'orbits',
  corrections: 'corrections',
  farm: 'farm',
  account: 'account',
  adminFarms: 'admin-farms',
  adminUsers: 'admin-users',
  adminWorkTypes: 'admin-work-types',
  adminServiceLevels: 'admin-service-levels',
  adminMachines: 'admin-machines',
  jobs: 'jobs',
  mailbox: 'mailbox',
} as const

export type RouteName = (typeof RouteNames)[keyof typeof RouteNames]

const everyone: readonly Role[] = ['admin', 'office', 'contractor', 'client']
const staff: readonly Role[] = ['admin', 'office']

/**
 * Which roles may open each signed-in page. Clients read the outlook and passes of their
 * own farms; contractors also draw fields; office staff see everything except user and
 * farm management, which is the admin's. The server enforces the same on every API route.
 */
export const pageRoles = {
  [RouteNames.outlook]: everyone,
  [RouteNames.passes]: everyone,
  [RouteNames.farm]: everyone,
  [RouteNames.account]: everyone,
  [RouteNames.fields]: ['admin', 'office', 'contractor'],
  [RouteNames.cab]: ['admin', 'office', 'contractor'],
  [RouteNames.plans]: staff,
  [RouteNames.orbits]: staff,
  [RouteNames.corrections]: everyone,
  [RouteNames.mailbox]: staff,
  [RouteNames.adminWorkTypes]: staff,
  [RouteNames.adminServiceLevels]: staff,
  [RouteNames.adminMachines]: staff,
  [RouteNames.jobs]: staff,
  [RouteNames.adminFarms]: ['admin'],
  [RouteNames.adminUsers]: ['admin'],
} as const satisfies Partial<Record<RouteName, readonly Role[]>>
