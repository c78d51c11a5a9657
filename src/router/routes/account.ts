import type { RouteRecordRaw } from 'vue-router'
import { pageRoles, RouteNames } from '../names'

/** The user's own account, the local mailbox, and the pages every visitor can reach. */
export const accountRoutes: RouteRecordRaw[] = [
  {
    path: '/account',
    name: RouteNames.account,
    component: () => import('@/views/AccountView.vue'),
    meta: { title: 'Your account', roles: pageRoles[RouteNames.account] },
  },
  {
    path: '/mailbox',
    name: RouteNames.mailbox,
    component: () => import('@/views/MailboxView.vue'),
    meta: { title: 'Mailbox', roles: pageRoles[RouteNames.mailbox], needsFakeMailbox: true },
  },
  {
    path: '/about',
    name: RouteNames.about,
    component: () => import('@/views/AboutView.vue'),
    meta: { title: 'About', public: true },
  },
  {
    path: '/not-allowed',
    name: RouteNames.notAllowed,
    component: () => import('@/views/NotAllowedView.vue'),
    meta: { title: 'Not available', public: true },
  },
  {
    path: '/:pathMatch(.*)*',
    name: RouteNames.notFound,
    component: () => import('@/views/NotFoundView.vue'),
    meta: { title: 'Page not found', public: true },
  },
]
