import { message } from 'ant-design-vue'
import type { ApiErrorBody } from '@shared/schemas'
import { config } from '@/config'

/** An error answered by the API (or a network failure, status 0). */
export class ApiError extends Error {
  readonly status: number
  readonly code: string
  /** Per-form-field messages, keyed by the request body's field names. */
  readonly fields: Record<string, string> | undefined

  constructor(status: number, code: string, text: string, fields?: Record<string, string>) {
    super(text)
    this.name = 'ApiError'
    this.status = status
    this.code = code
    this.fields = fields
  }

  get hasFieldErrors(): boolean {
    return this.fields !== undefined && Object.keys(this.fields).length > 0
  }
}

/**
 * The window event that tells the header's job bar to look at the queue soon: a change
 * saved on the server (a field, a tree line, an outage, a work type...) may have queued
 * forecast recomputes, which often finish within a few seconds.
 */
export const JOBS_QUEUED_EVENT = 'skyfurrow:jobs-queued'

export function announceJobsMayBeQueued(): void {
  window.dispatchEvent(new CustomEvent(JOBS_QUEUED_EVENT))
}

export type Query = Record<string, string | number | boolean | undefined | null>

export interface RequestOptions {
  query?: Query
  body?: unknown
  /**
   * Statuses the caller handles itself (no toast), e.g. 404 on a detail page that shows
   * its own "not found" state. Field errors (400 with `fields`) are never toasted: the
   * form shows them beside its inputs.
   */
  quiet?: number[]
  /** Do not send the user to sign-in on 401 (used by the session check itself). */
  allowAnonymous?: boolean
  /** No toast when the server cannot be reached (pages that work offline say so themselves). */
  quietNetwork?: boolean
}

type UnauthorizedHandler = () => void
let onUnauthorized: UnauthorizedHandler = () => {}

/** Set once at start-up (main.ts): what to do when the session has ended under us. */
export function setUnauthorizedHandler(handler: UnauthorizedHandler): void {
  onUnauthorized = handler
}

/** Builds `/api/path?query`, leaving out empty query values. */
export function buildUrl(path: string, query?: Query): string {
  const url = `${config.apiBase}${path}`
  if (!query) return url
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(query)) {
    if (value === undefined || value === null || value === '') continue
    params.set(key, String(value))
  }
  const text = params.toString()
  return text ? `${url}?${text}` : url
}

/** Reads an error body if the server sent one; otherwise describes the status. */
export async function toApiError(response: Response): Promise<ApiError> {
  let body: Partial<ApiErrorBody> | undefined
  try {
    body = (await response.json()) as Partial<ApiErrorBody>
  } catch {
    body = undefined
  }
  const error = body?.error
  if (error && typeof error.message === 'string') {
    return new ApiError(response.status, error.code ?? 'error', error.message, error.fields)
  }
  return new ApiError(response.status, 'http_' + response.status, describeStatus(response.status))
}

function describeStatus(status: number): string {
  if (status === 401) return 'Please sign in again.'
  if (status === 403) return 'Your account is not allowed to do that.'
  if (status === 404) return 'That was not found. It may have been removed.'
  if (status === 429) return 'Too many attempts. Please wait a minute and try again.'
  if (status >= 500) return 'The server had a problem. Please try again in a moment.'
  return `The request failed (HTTP ${status}).`
}

async function request<T>(method: string, path: string, options: RequestOptions = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' }
  let body: string | undefined
  if (options.body !== undefined) {
    headers['Content-Type'] = 'application/json'
    body = JSON.stringify(options.body)
  }
  let response: Response
  try {
    response = await fetch(buildUrl(path, options.query), {
      method,
      headers,
      body,
      credentials: 'same-origin',
    })
  } catch {
    const error = new ApiError(0, 'network', 'Cannot reach the Skyfurrow server. Check the connection and try again.')
    if (!options.quietNetwork && !options.quiet?.includes(0)) message.error(error.message, config.messageDurationS)
    throw error
  }
  if (!response.ok) {
    const error = await toApiError(response)
    if (response.status === 401 && !options.allowAnonymous) {
      onUnauthorized()
    } else if (!error.hasFieldErrors && !options.quiet?.includes(response.status) && response.status !== 401) {
      message.error(error.message, config.messageDurationS)
    }
    throw error
  }
  if (method !== 'GET') announceJobsMayBeQueued()
  if (response.status === 204) return undefined as T
  const type = response.headers.get('content-type') ?? ''
  if (!type.includes('application/json')) return undefined as T
  return (await response.json()) as T
}

/** The one HTTP client: JSON in and out, the session cookie, errors surfaced once. */
export const http = {
  get: <T>(path: string, query?: Query, options?: Omit<RequestOptions, 'query' | 'body'>) =>
    request<T>('GET', path, { ...options, query }),
  post: <T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('POST', path, { ...options, body: body ?? {} }),
  patch: <T>(path: string, body: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('PATCH', path, { ...options, body }),
  put: <T>(path: string, body: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('PUT', path, { ...options, body }),
  delete: <T = void>(path: string, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('DELETE', path, options),
}
