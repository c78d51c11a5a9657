// The audit log of admin actions. `record` is called inside the transaction of the change
// it describes, so a change and its audit row are kept together or not at all.
import type { AuditAction, AuditEvent, AuditListQuery, AuditTargetType } from '../../shared/schemas/audit.ts'
import type { Page } from '../../shared/schemas/common.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { AuditEventRow } from '../db/schema.ts'
import { pageOf, type ServiceContext } from './context.ts'

export interface AuditActor {
  id: number
  name: string
}

export type AuditChanges = Record<string, { from: unknown; to: unknown }>

/** Keys whose value differs between `before` and `after` (arrays compared as sorted sets). */
export function changesBetween(before: Record<string, unknown>, after: Record<string, unknown>, keys: string[]): AuditChanges {
  const norm = (v: unknown) => (Array.isArray(v) ? JSON.stringify([...v].sort()) : JSON.stringify(v ?? null))
  const out: AuditChanges = {}
  for (const k of keys) if (k in after && norm(before[k]) !== norm(after[k])) out[k] = { from: before[k] ?? null, to: after[k] ?? null }
  return out
}

export async function recordAudit(
  repos: Repositories,
  actor: AuditActor,
  action: AuditAction,
  target: { type: AuditTargetType; id: number; name: string },
  changes: AuditChanges = {},
): Promise<void> {
  await repos.audit.insert({
    actorId: actor.id,
    actorName: actor.name,
    action,
    targetType: target.type,
    targetId: target.id,
    targetName: target.name.slice(0, 254),
    changesJson: JSON.stringify(changes),
  })
}

function toAuditEvent(row: AuditEventRow): AuditEvent {
  return {
    id: row.id,
    at: row.at.toISOString(),
    actorId: row.actorId,
    actorName: row.actorName,
    action: row.action as AuditAction,
    targetType: row.targetType as AuditTargetType,
    targetId: row.targetId,
    targetName: row.targetName,
    changes: JSON.parse(row.changesJson) as AuditChanges,
  }
}

export function createAuditService(ctx: ServiceContext) {
  return {
    async list(query: AuditListQuery): Promise<Page<AuditEvent>> {
      const { rows, total } = await ctx.store.repos.audit.list(query)
      return pageOf(rows.map(toAuditEvent), total, query)
    },
  }
}
export type AuditService = ReturnType<typeof createAuditService>
