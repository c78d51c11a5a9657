/**
 * Registers the service worker built by vite-plugin-pwa (Workbox): the app installs and
 * opens without signal. A new version activates by itself.
 */
import { registerSW } from 'virtual:pwa-register'

export function registerServiceWorker(): void {
  if (!('serviceWorker' in navigator) || import.meta.env.DEV) return
  registerSW({ immediate: true })
}
