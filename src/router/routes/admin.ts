import type { RouteRecordRaw } from 'vue-router'
import { pageRoles, RouteNames } from '../names'

/** Admin pages: farms and users (admin only), work types, service levels, machines, forecast jobs. */
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
  {
    path: '/admin/machines',
    name: RouteNames.adminMachines,
    component: () => import('@/views/admin/AdminMachinesView.vue'),
    meta: { title: 'Machines', roles: pageRoles[RouteNames.adminMachines] },
  },
  {
    path: '/jobs',
    name: RouteNames.jobs,
    component: () => import('@/views/JobsView.vue'),
    meta: { title: 'Forecast jobs', roles: pageRoles[RouteNames.jobs] },
  },
]
