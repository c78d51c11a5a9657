// Lists the routes registered on an Express 5 app as "METHOD /path" strings, by walking
// app.router's layer stack (and the stacks of mounted routers).
import type { Express } from 'express'

interface Layer {
  rawPath?: string | RegExp | (string | RegExp)[]
  route?: { path: string | string[]; methods: Record<string, boolean> }
  handle?: { stack?: Layer[] }
}

function join(prefix: string, path: string): string {
  const joined = `${prefix}/${path}`.replace(/\/{2,}/g, '/')
  return joined.length > 1 ? joined.replace(/\/$/, '') : joined
}

export function listRoutes(app: Express): string[] {
  const routes: string[] = []
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path]
        for (const method of Object.keys(layer.route.methods)) {
          if (!layer.route.methods[method] || method === '_all') continue
          for (const path of paths) routes.push(`${method.toUpperCase()} ${join(prefix, path)}`)
        }
      } else if (layer.handle?.stack) {
        const raw = Array.isArray(layer.rawPath) ? layer.rawPath[0] : layer.rawPath
        if (raw instanceof RegExp) throw new Error(`listRoutes cannot name a router mounted at ${raw}`)
        walk(layer.handle.stack, join(prefix, raw ?? '/'))
      }
    }
  }
  const router = (app as unknown as { router?: { stack: Layer[] } }).router
  if (!router) throw new Error('listRoutes: the app has no router (no routes registered)')
  walk(router.stack, '')
  return [...new Set(routes)]
}
