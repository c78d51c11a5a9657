// A small levelled logger writing one line per event to stdout/stderr.
import type { LogLevel } from './config.ts'

const order: Record<LogLevel, number> = { error: 0, warn: 1, info: 2, debug: 3 }

export interface Logger {
  error(message: string, detail?: unknown): void
  warn(message: string, detail?: unknown): void
  info(message: string, detail?: unknown): void
  debug(message: string, detail?: unknown): void
}

export function createLogger(level: LogLevel): Logger {
  const at = (l: LogLevel) => (message: string, detail?: unknown) => {
    if (order[l] > order[level]) return
    const line = `${new Date().toISOString()} ${l.toUpperCase().padEnd(5)} ${message}`
    const out = l === 'error' || l === 'warn' ? console.error : console.log
    if (detail === undefined) out(line)
    else out(line, detail instanceof Error ? (detail.stack ?? detail.message) : detail)
  }
  return { error: at('error'), warn: at('warn'), info: at('info'), debug: at('debug') }
}
