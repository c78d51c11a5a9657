import type { RouteRecordRaw } from 'vue-router'
import { pageRoles, RouteNames } from '../names'

/** The day-to-day pages: outlook, fields, passes, plans, orbits, a farm's page. */
export const workRoutes: RouteRecordRaw[] = [
  {
    path: '/outlook',
    name: RouteNames.outlook,
    component: () => import('@/views/OutlookView.vue'),
    meta: { title: 'Outlook', roles: pageRoles[RouteNames.outlook] },
  },
  {
    path: '/fields',
    name: RouteNames.fields,
    component: () => import('@/views/FieldsView.vue'),
    meta: { title: 'Fields', roles: pageRoles[RouteNames.fields] },
  },
  {
    path: '/passes',
    name: RouteNames.passes,
    component: () => import('@/views/PassesView.vue'),
    meta: { title: 'Passes', roles: pageRoles[RouteNames.passes] },
  },
  {
    path: '/cab',
    name: RouteNames.cab,
    component: () => import('@/views/CabView.vue'),
    meta: { title: 'In the cab', roles: pageRoles[RouteNames.cab] },
  },
  {
    path: '/plans',
    name: RouteNames.plans,
    component: () => import('@/views/PlansView.vue'),
    meta: { title: 'Plans', roles: pageRoles[RouteNames.plans] },
  },
  {
    path: '/orbits',
    name: RouteNames.orbits,
    component: () => import('@/views/OrbitsView.vue'),
    meta: { title: 'Orbits', roles: pageRoles[RouteNames.orbits] },
  },
  {
    path: '/corrections',
    name: RouteNames.corrections,
    component: () => import('@/views/CorrectionsView.vue'),
    meta: { title: 'Corrections', roles: pageRoles[RouteNames.corrections] },
  },
  {
    path: '/farms/:id(\\d+)',
    name: RouteNames.farm,
    component: () => import('@/views/FarmView.vue'),
    props: (route) => ({ id: Number(route.params.id) }),
    meta: { title: 'Farm', roles: pageRoles[RouteNames.farm] },
  },
]
