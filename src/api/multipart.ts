import { message } from 'ant-design-vue'
import { config } from '@/config'
import { announceJobsMayBeQueued, ApiError, buildUrl, toApiError } from './http'

/**
 * Sends a multipart form (file uploads) the way the JSON client sends JSON: the session
 * cookie, one error type, errors toasted unless the caller handles that status itself.
 */
export async function postForm<T>(path: string, form: FormData, options: { quiet?: number[] } = {}): Promise<T> {
  let response: Response
  try {
    response = await fetch(buildUrl(path), {
      method: 'POST',
      body: form,
      headers: { Accept: 'application/json' },
      credentials: 'same-origin',
    })
  } catch {
    const error = new ApiError(0, 'network', 'Cannot reach the Skyfurrow server. Check the connection and try again.')
    message.error(error.message, config.messageDurationS)
    throw error
  }
  if (!response.ok) {
    // Keep the whole body: upload errors carry per-record or per-feature details.
    const text = await response.text()
    const error = await toApiError(new Response(text, { status: response.status, headers: response.headers }))
    const details = parseJson(text)
    Object.assign(error, { body: details })
    if (!options.quiet?.includes(response.status) && !error.hasFieldErrors) message.error(error.message, config.messageDurationS)
    throw error as ApiError & { body: unknown }
  }
  announceJobsMayBeQueued()
  if (response.status === 204) return undefined as T
  return (await response.json()) as T
}

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text)
  } catch {
    return null
  }
}

/** The raw error body kept by `postForm` (null when there was none). */
export function errorBody(error: unknown): Record<string, unknown> | null {
  if (error && typeof error === 'object' && 'body' in error) {
    const body = (error as { body: unknown }).body
    if (body && typeof body === 'object') return body as Record<string, unknown>
  }
  return null
}
