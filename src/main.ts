import '@fontsource/open-sans/latin-400.css'
import '@fontsource/open-sans/latin-600.css'
import '@fontsource/open-sans/latin-700.css'
import './styles/main.css'

import { createApp } from 'vue'
import { z } from 'zod'
import { createPinia } from 'pinia'
import {
  Alert,
  Button,
  Checkbox,
  ConfigProvider,
  Descriptions,
  Drawer,
  Dropdown,
  Empty,
  Form,
  Input,
  Menu,
  Modal,
  Popconfirm,
  Radio,
  Result,
  Select,
  Space,
  Spin,
  Table,
  Tag,
  Tooltip,
  message,
} from 'ant-design-vue'
import App from './App.vue'
import { setUnauthorizedHandler } from './api/http'
import { config } from './config'
import { router, RouteNames } from './router'
import { registerServiceWorker } from './pwa'
import { useSessionStore } from './stores/session'

// zod 4 probes `new Function` to compile parsers, which the content security policy
// (script-src 'self', no 'unsafe-eval') refuses and reports: parse without it.
z.config({ jitless: true })

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
app.use(router)

// Only the ant-design-vue components we use (registering all of them triples the bundle).
for (const component of [
  Alert,
  Button,
  Checkbox,
  ConfigProvider,
  Descriptions,
  Drawer,
  Dropdown,
  Empty,
  Form,
  Input,
  Menu,
  Modal,
  Popconfirm,
  Radio,
  Result,
  Select,
  Space,
  Spin,
  Table,
  Tag,
  Tooltip,
]) {
  app.use(component)
}

message.config({ top: '72px', maxCount: 3, duration: config.messageDurationS })

// When the server says the session has ended, forget the user and ask them to sign in.
setUnauthorizedHandler(() => {
  const session = useSessionStore(pinia)
  const wasSignedIn = session.signedIn
  session.forget()
  const current = router.currentRoute.value
  if (current.meta.public) return
  if (wasSignedIn) message.info('Your session has ended. Please sign in again.')
  void router.push({ name: RouteNames.signIn, query: { next: current.fullPath } })
})

void router.isReady().then(() => app.mount('#app'))
registerServiceWorker()
