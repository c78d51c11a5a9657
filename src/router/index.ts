import { createRouter, createWebHistory } from 'vue-router'
import { config } from '@/config'
import { useMetaStore } from '@/stores/meta'
import { useSessionStore } from '@/stores/session'
import './meta'
import { decideNavigation } from './guard'
import { RouteNames } from './names'
import { navigationEnded, navigationStarted } from './pending'
import { accountRoutes } from './routes/account'
import { adminRoutes } from './routes/admin'
import { authRoutes } from './routes/auth'
import { workRoutes } from './routes/work'

export { RouteNames, type RouteName } from './names'

export const router = createRouter({
  history: createWebHistory(import.meta.env.BASE_URL),
  routes: [
    { path: '/', redirect: { name: RouteNames.outlook }, meta: { title: 'Outlook' } },
    ...authRoutes,
    ...workRoutes,
    ...adminRoutes,
    // Last: it holds the catch-all "page not found".
    ...accountRoutes,
  ],
  scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
})

router.beforeEach(async (to) => {
  navigationStarted(to)
  const session = useSessionStore()
  const meta = useMetaStore()
  await Promise.all([session.ensureChecked(), meta.ensureLoaded()])
  return decideNavigation(to, { user: session.user, fakeMailbox: meta.meta?.fakeMailbox ?? false })
})

router.afterEach((to) => {
  navigationEnded(to)
  document.title = to.meta.title ? `${to.meta.title} · ${config.appName}` : config.appName
})

router.onError(() => navigationEnded(null))
