// Cross-site request protection: a state-changing request (anything but GET, HEAD, OPTIONS)
// must name its origin (Origin header, or else Referer) and that origin must be PUBLIC_URL's
// or the request's own Host. Cookies are SameSite=Lax as well; this covers the rest.
import type { RequestHandler } from 'express'
import { HttpError } from './errors.ts'

const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS'])

function originOf(url: string | undefined): string | undefined {
  if (!url) return undefined
  try {
    return new URL(url).origin
  } catch {
    return undefined
  }
}

export function originCheck(publicUrl: string): RequestHandler {
  const allowed = new URL(publicUrl).origin
  return (req, _res, next) => {
    if (safeMethods.has(req.method)) return next()
    const source = originOf(req.get('origin')) ?? originOf(req.get('referer'))
    if (source && (source === allowed || new URL(source).host === req.get('host'))) return next()
    throw new HttpError(
      403,
      'bad_origin',
      source
        ? 'This request came from another site and was refused.'
        : 'This request did not say which site it came from and was refused.',
    )
  }
}
