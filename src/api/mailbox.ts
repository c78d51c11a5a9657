import type { Page } from '@shared/schemas'
import { buildUrl, http } from './http'
import type { ListParams } from './farms'

export interface MailSummary {
  id: number
  from: string
  to: string
  subject: string
  receivedAt: string
  hasAttachments: boolean
}

export interface MailAttachment {
  filename: string
  contentType: string
  size: number
}

export interface MailMessage extends MailSummary {
  text: string
  html: string
  attachments: MailAttachment[]
}

export const listMail = (params: ListParams = {}) => http.get<Page<MailSummary>>('/mailbox', params)

export const getMail = (id: number) => http.get<MailMessage>(`/mailbox/${id}`)

/** A plain link (the browser downloads it with the session cookie). */
export const attachmentUrl = (id: number, index: number) => buildUrl(`/mailbox/${id}/attachments/${index}`)
