/**
 * Registers the service worker built by vite-plugin-pwa (Workbox): the app installs and
 * opens without signal. A new version activates by itself.
 */
import { registerSW } from 'virtual:pwa-register'

export function registerServiceWorker(): void {
  // In `npm run dev` the plugin's virtual module registers nothing (devOptions are off).
  if (!('serviceWorker' in navigator)) return
  registerSW({ immediate: true })
}
