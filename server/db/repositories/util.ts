import { sql, type SQL } from 'drizzle-orm'
import type { MySqlColumn } from 'drizzle-orm/mysql-core'

/** A LIKE pattern matching `text` anywhere, with LIKE's wildcards escaped. */
export function containsPattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
}

/** `column LIKE pattern` with an explicit escape character. */
export function likeEscaped(column: MySqlColumn, pattern: string): SQL {
  return sql`${column} LIKE ${pattern} ESCAPE '\\\\'`
}

/**
 * A write that would repeat a unique key (a farm name, a machine name, an e-mail): what
 * a transaction throws instead of the database's own duplicate-key error, so services
 * need not know the database's error codes.
 */
export class UniqueViolation extends Error {
  constructor(cause: unknown) {
    super('A unique key would be repeated.', { cause })
    this.name = 'UniqueViolation'
  }
}

/** True for MariaDB's duplicate-key error, also when Drizzle wraps it. */
export function isDuplicateKey(error: unknown): boolean {
  let e: unknown = error
  for (let depth = 0; e && depth < 4; depth++) {
    if ((e as { code?: string }).code === 'ER_DUP_ENTRY') return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

export interface PageRequest {
  page: number
  pageSize: number
  order: 'asc' | 'desc'
  q?: string
}
