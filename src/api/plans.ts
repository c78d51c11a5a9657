import type {
  PlanOptOut,
  PlanPreview,
  PlanPreviewInput,
  PlanRevisionDetail,
  PlanSchedule,
  PlanScheduleInput,
  PlanSendInput,
  PlanSendResult,
  PlanSendRow,
  PlanWeekOption,
} from '@shared/schemas/plans'
import { http } from './http'

/** Weekly plan e-mails: compose, preview, send, the log, the automatic send and opt-outs. */
export const listPlanWeeks = (farmId: number) => http.get<PlanWeekOption[]>('/plans/weeks', { farmId })

/** Field errors (a bad extra address) come back as a 400 with `fields` for the form. */
export const previewPlan = (input: PlanPreviewInput & { extraRecipients?: string[] }) =>
  http.post<PlanPreview>('/plans/preview', input, { quiet: [400] })

export const sendPlan = (input: PlanSendInput) => http.post<PlanSendResult>('/plans/send', input, { quiet: [400] })

export const listPlanSends = (query: { farmId?: number; weekStart?: string }) => http.get<PlanSendRow[]>('/plans/sends', query)

export const getPlanRevision = (id: number, recipient?: string) =>
  http.get<PlanRevisionDetail>(`/plans/revisions/${id}`, { recipient })

export const resendPlanRevision = (id: number, recipients: string[]) =>
  http.post<PlanSendResult>(`/plans/revisions/${id}/resend`, { confirm: true, recipients })

export const getPlanSchedule = (farmId: number) => http.get<PlanSchedule>(`/farms/${farmId}/plan-schedule`)

export const savePlanSchedule = (farmId: number, input: PlanScheduleInput) =>
  http.put<PlanSchedule>(`/farms/${farmId}/plan-schedule`, input, { quiet: [400] })

export const listPlanOptOuts = (farmId: number) => http.get<PlanOptOut[]>(`/farms/${farmId}/plan-opt-outs`)

export const reincludePlanRecipient = (farmId: number, email: string) =>
  http.delete(`/farms/${farmId}/plan-opt-outs/${encodeURIComponent(email)}`)
