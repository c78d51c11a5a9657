// Request validation with the shared zod schemas: bad input becomes a 400 whose `fields`
// name each offending field (dotted path, e.g. "clientIds.0") with a sentence.
import type { z } from 'zod'
import { badRequest } from './errors.ts'

export function fieldMessages(error: z.ZodError): Record<string, string> {
  const fields: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.') || '_'
    if (!(key in fields)) fields[key] = issue.message
  }
  return fields
}

/** Parses `value` with `schema` or throws HttpError 400 with per-field messages. */
export function parse<S extends z.ZodType>(schema: S, value: unknown, what = 'request'): z.output<S> {
  const result = schema.safeParse(value ?? {})
  if (result.success) return result.data
  const fields = fieldMessages(result.error)
  const names = Object.keys(fields).filter((k) => k !== '_')
  const message = names.length
    ? `Check the ${what}: ${names.join(', ')}.`
    : `The ${what} is not valid: ${fields._ ?? 'unexpected shape'}.`
  throw badRequest(message, fields)
}
