import type { RouteRecordRaw } from 'vue-router'
import { pageRoles, RouteNames } from '../names'

/** Admin pages: farms and users (admin only), work types and service levels. */
export const adminRoutes: RouteRecordRaw[] = [
  { path: '/admin', redirect: { name: RouteNames.adminFarms }, meta: { title: 'Admin' } },
  {
    path: '/admin/farms',
    name: RouteNames.adminFarms,
    component: () => import('@/views/admin/AdminFarmsView.vue'),
    meta: { title: 'Farms', roles: pageRoles[RouteNames.adminFarms] },
  },
  {
    path: '/admin/users',
    name: RouteNames.adminUsers,
    component: () => import('@/views/admin/AdminUsersView.vue'),
    meta: { title: 'Users', roles: pageRoles[RouteNames.adminUsers] },
  },
  {
    path: '/admin/work-types',
    name: RouteNames.adminWorkTypes,
    component: () => import('@/views/admin/AdminWorkTypesView.vue'),
    meta: { title: 'Work types', roles: pageRoles[RouteNames.adminWorkTypes] },
  },
  {
    path: '/admin/service-levels',
    name: RouteNames.adminServiceLevels,
    component: () => import('@/views/admin/AdminServiceLevelsView.vue'),
    meta: { title: 'Service levels', roles: pageRoles[RouteNames.adminServiceLevels] },
  },
]
