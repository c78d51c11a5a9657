import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vite'
import vue from '@vitejs/plugin-vue'
import { VitePWA } from 'vite-plugin-pwa'

// The client build. In development (`npm run dev`) /api is proxied to the Express server.
// The service worker (vite-plugin-pwa, Workbox generateSW) makes the app installable and
// keeps it working without signal: the shell, scripts, styles and fonts are precached;
// the session check and the installation facts are answered from a cache when the
// network does not answer, so a crew member's cab view opens offline. The crew's week and
// outbox live in IndexedDB (src/lib/crewOutbox.ts), not in the service worker.
export default defineConfig({
  plugins: [
    vue(),
    VitePWA({
      registerType: 'autoUpdate',
      // Registered from src/pwa.ts (no inline script, so a strict CSP holds).
      injectRegister: false,
      includeAssets: ['favicon.svg'],
      manifest: {
        name: 'Skyfurrow',
        short_name: 'Skyfurrow',
        description: 'Satellite-precision outlook and pass planning; the crew view works without signal.',
        start_url: '/cab',
        scope: '/',
        display: 'standalone',
        background_color: '#f6f5f0',
        theme_color: '#2b5d4a',
        icons: [
          { src: '/icon-192.png', sizes: '192x192', type: 'image/png' },
          { src: '/icon-512.png', sizes: '512x512', type: 'image/png' },
          { src: '/icon-512-maskable.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
        ],
      },
      workbox: {
        globPatterns: ['**/*.{js,css,html,svg,png,woff2}'],
        maximumFileSizeToCacheInBytes: 6 * 1024 * 1024,
        navigateFallback: '/index.html',
        navigateFallbackDenylist: [/^\/api\//],
        cleanupOutdatedCaches: true,
        runtimeCaching: [
          {
            urlPattern: ({ url, sameOrigin }) => sameOrigin && (url.pathname === '/api/auth/me' || url.pathname === '/api/meta'),
            handler: 'NetworkFirst',
            options: {
              cacheName: 'skyfurrow-session',
              networkTimeoutSeconds: 6,
              cacheableResponse: { statuses: [200] },
            },
          },
        ],
      },
    }),
  ],
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  server: {
    host: '127.0.0.1',
    port: 5173,
    proxy: { '/api': { target: process.env.API_URL ?? 'http://127.0.0.1:3000', changeOrigin: false } },
  },
  build: { outDir: 'dist', chunkSizeWarningLimit: 1200 },
  worker: { format: 'es' },
})
