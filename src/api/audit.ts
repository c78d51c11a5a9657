import type { AuditAction, AuditEvent, AuditTargetType, Page } from '@shared/schemas'
import { http } from './http'

export interface AuditParams {
  page?: number
  pageSize?: number
  action?: AuditAction
  targetType?: AuditTargetType
  targetId?: number
}

/** The audit log of admin actions, newest first (admins only). */
export const listAuditEvents = (params: AuditParams = {}) => http.get<Page<AuditEvent>>('/audit', { ...params })
