import type { Role } from '@shared/schemas'

declare module 'vue-router' {
  interface RouteMeta {
    /** Page title: the browser tab shows "<title> · Skyfurrow". */
    title: string
    /** Reachable while signed out (sign-in, password pages, About, not found). */
    public?: boolean
    /** Only for signed-out visitors; a signed-in user goes to the start page instead. */
    guestOnly?: boolean
    /** Roles allowed; leave out on public pages. */
    roles?: readonly Role[]
    /** Shown only while mail goes to the local fake SMTP server. */
    needsFakeMailbox?: boolean
  }
}

export {}
