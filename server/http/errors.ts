// HttpError (thrown by services) and the one error middleware that turns every error into
// the JSON body `{ error: { code, message, fields? } }` (shared/schemas/common.ts ApiErrorBody).
import type { ErrorRequestHandler, RequestHandler } from 'express'
import { DATABASE_DOWN_MESSAGE, isDatabaseUnavailable } from './databaseDown.ts'
import type { ApiErrorBody } from '../../shared/schemas/common.ts'
import type { Logger } from '../logger.ts'

export class HttpError extends Error {
  readonly status: number
  readonly code: string
  readonly fields?: Record<string, string>

  constructor(status: number, code: string, message: string, fields?: Record<string, string>) {
    super(message)
    this.name = 'HttpError'
    this.status = status
    this.code = code
    this.fields = fields
  }
}

export const badRequest = (message: string, fields?: Record<string, string>) =>
  new HttpError(400, 'invalid_input', message, fields)
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthenticated', message)
export const forbidden = (message = 'Your role does not allow this.') => new HttpError(403, 'forbidden', message)
export const notFound = (what = 'The requested item') => new HttpError(404, 'not_found', `${what} was not found.`)
export const conflict = (message: string, fields?: Record<string, string>) =>
  new HttpError(409, 'conflict', message, fields)

/** Unknown /api paths. */
export const apiNotFound: RequestHandler = (req) => {
  throw new HttpError(404, 'not_found', `No API route for ${req.method} ${req.path}.`)
}

/** Errors thrown by body-parser and similar middleware carry a status and a type. */
interface ParserError {
  status?: number
  statusCode?: number
  type?: string
  expose?: boolean
}

export function errorMiddleware(logger: Logger, showStack: boolean): ErrorRequestHandler {
  return (err: unknown, req, res, next) => {
    if (res.headersSent) return next(err)
    let status = 500
    let body: ApiErrorBody
    if (err instanceof HttpError) {
      status = err.status
      body = { error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } }
    } else {
      const p = (err ?? {}) as ParserError
      const parserStatus = p.status ?? p.statusCode
      if (p.type === 'entity.too.large') {
        status = 413
        body = { error: { code: 'payload_too_large', message: 'The request body is too large.' } }
      } else if (p.type === 'entity.parse.failed') {
        status = 400
        body = { error: { code: 'invalid_json', message: 'The request body is not valid JSON.' } }
      } else if (parserStatus && parserStatus >= 400 && parserStatus < 500 && p.expose) {
        status = parserStatus
        body = { error: { code: 'bad_request', message: (err as Error).message || 'The request was not understood.' } }
      } else if (isDatabaseUnavailable(err)) {
        status = 503
        res.set('Retry-After', '30')
        logger.warn(`${req.method} ${req.originalUrl}: the database is unreachable`)
        body = { error: { code: 'database_unavailable', message: DATABASE_DOWN_MESSAGE } }
      } else {
        logger.error(`${req.method} ${req.originalUrl} failed`, err)
        body = { error: { code: 'internal', message: 'Something went wrong on the server. Please try again.' } }
      }
    }
    if (showStack && status >= 500 && err instanceof Error) {
      ;(body.error as ApiErrorBody['error'] & { stack?: string }).stack = err.stack
    }
    res.status(status).json(body)
  }
}
