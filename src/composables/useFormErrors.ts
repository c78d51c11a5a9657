import { reactive, watch } from 'vue'
import type { z } from 'zod'
import { ApiError } from '@/api/http'

export type FieldErrors = Record<string, string>

/** Maps zod issues to one message per top-level field (the first issue wins). */
export function issuesToFields(issues: readonly { path: readonly PropertyKey[]; message: string }[]): FieldErrors {
  const fields: FieldErrors = {}
  for (const issue of issues) {
    const key = issue.path.length > 0 ? String(issue.path[0]) : '_form'
    fields[key] ??= issue.message
  }
  return fields
}

/**
 * Field messages for a form, from two sources that use the same words: the shared zod
 * schema checked before sending, and the server's `fields` when it refuses the request.
 * Bind `errors.x` to each `a-form-item`'s `help` and `status(x)` to its `validate-status`.
 * Pass the form's reactive model to clear a field's message when that field changes.
 */
export function useFormErrors(model?: Record<string, unknown>) {
  const errors = reactive<FieldErrors>({})

  // A field's message goes away as soon as the user changes that field.
  if (model) {
    watch(
      () => ({ ...model }),
      (now, before) => {
        for (const key of Object.keys(now)) {
          if (now[key] !== before[key]) delete errors[key]
        }
      },
    )
  }

  function clear(): void {
    for (const key of Object.keys(errors)) delete errors[key]
  }

  function set(fields: FieldErrors): void {
    clear()
    Object.assign(errors, fields)
  }

  /** Checks the values against the schema; returns the parsed values or null (errors shown). */
  function check<S extends z.ZodType>(schema: S, values: unknown): z.infer<S> | null {
    const result = schema.safeParse(values)
    if (result.success) {
      clear()
      return result.data
    }
    set(issuesToFields(result.error.issues))
    return null
  }

  /**
   * Takes a failed request: field errors are shown on the form (true returned); anything
   * else was already shown as a message by the http client (false returned).
   */
  function fromError(error: unknown): boolean {
    if (error instanceof ApiError && error.hasFieldErrors) {
      set(error.fields ?? {})
      return true
    }
    return false
  }

  function status(field: string): '' | 'error' {
    return errors[field] ? 'error' : ''
  }

  return { errors, clear, set, check, fromError, status }
}
