import type { Express } from 'express'

export interface RouteInfo {
  method: string
  path: string
}

interface Layer {
  rawPath?: string
  route?: { path: string; methods: Record<string, boolean> }
  handle?: { stack?: Layer[] }
}

/** Every route the app serves, as "METHOD /path", read from Express's own routing table. */
export function listRoutes(app: Express): RouteInfo[] {
  const out: RouteInfo[] = []
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const path = (prefix + layer.route.path).replace(/(.)\/$/, '$1')
        for (const method of Object.keys(layer.route.methods)) out.push({ method: method.toUpperCase(), path })
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack, prefix + (typeof layer.rawPath === 'string' ? layer.rawPath : ''))
      }
    }
  }
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '')
  return out.filter((r) => r.path.startsWith('/api'))
}
