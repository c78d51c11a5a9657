// The audit log of admin actions: who changed which user's role, activity or farm access,
// and which work type, when. Written in the same transaction as the change it describes.
import { z } from 'zod'

export const auditActions = [
  'user.invited',
  'user.role-changed',
  'user.farm-access-changed',
  'user.deactivated',
  'user.reactivated',
  'work-type.created',
  'work-type.changed',
  'work-type.deleted',
] as const
export const auditActionSchema = z.enum(auditActions)
export type AuditAction = z.infer<typeof auditActionSchema>

export const auditTargetTypes = ['user', 'work-type'] as const
export type AuditTargetType = (typeof auditTargetTypes)[number]

export interface AuditEvent {
  id: number
  at: string
  actorId: number | null
  actorName: string
  action: AuditAction
  targetType: AuditTargetType
  targetId: number
  targetName: string
  /** What changed, e.g. { role: { from: 'office', to: 'admin' } }. */
  changes: Record<string, { from: unknown; to: unknown }>
}

export const auditListQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(20),
  action: auditActionSchema.optional(),
  targetType: z.enum(auditTargetTypes).optional(),
  targetId: z.coerce.number().int().positive().optional(),
})
export type AuditListQuery = z.infer<typeof auditListQuerySchema>
