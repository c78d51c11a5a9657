// The account e-mails: invitation and password reset, as plain text and HTML.
import type { OutgoingMail } from './transport.ts'

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)
}

function layout(title: string, paragraphs: string[], action: { label: string; url: string }, footer: string): string {
  const body = paragraphs.map((p) => `<p style="margin:0 0 14px">${escapeHtml(p)}</p>`).join('\n')
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(title)}</title></head>
<body style="margin:0;padding:24px;background:#f4f1ea;font-family:'Open Sans',Arial,sans-serif;color:#1f2a36">
<div style="max-width:560px;margin:0 auto;background:#ffffff;border-radius:8px;padding:28px">
<h1 style="font-size:20px;margin:0 0 18px;color:#00204d">${escapeHtml(title)}</h1>
${body}
<p style="margin:22px 0"><a href="${escapeHtml(action.url)}" style="background:#00204d;color:#ffffff;padding:10px 18px;border-radius:6px;text-decoration:none;display:inline-block">${escapeHtml(action.label)}</a></p>
<p style="margin:0 0 14px;font-size:13px;color:#5b6570">If the button does not work, open this address:<br><span style="word-break:break-all">${escapeHtml(action.url)}</span></p>
<p style="margin:18px 0 0;font-size:12px;color:#7a828a">${escapeHtml(footer)}</p>
</div></body></html>`
}

export function inviteMail(input: {
  to: string
  name: string
  businessName: string
  invitedBy: string
  link: string
  expiresInDays: number
}): OutgoingMail {
  const subject = `${input.businessName} invited you to Skyfurrow`
  const paragraphs = [
    `Hello ${input.name},`,
    `${input.invitedBy} has set up a Skyfurrow account for you at ${input.businessName}. Skyfurrow shows the satellite-positioning outlook for your fields and the precision passes planned on them.`,
    `Choose your password with the link below. The link works once and expires in ${input.expiresInDays} days.`,
  ]
  const footer = 'If you did not expect this invitation, you can ignore this e-mail.'
  return {
    to: input.to,
    subject,
    text: `${paragraphs.join('\n\n')}\n\nSet your password: ${input.link}\n\n${footer}\n`,
    html: layout(subject, paragraphs, { label: 'Set your password', url: input.link }, footer),
  }
}

export function resetMail(input: { to: string; name: string; link: string; expiresInMinutes: number }): OutgoingMail {
  const subject = 'Reset your Skyfurrow password'
  const paragraphs = [
    `Hello ${input.name},`,
    'Someone asked to reset the password of your Skyfurrow account. If it was you, choose a new password with the link below.',
    `The link works once and expires in ${input.expiresInMinutes} minutes. Your current password stays valid until you choose a new one.`,
  ]
  const footer = 'If you did not ask for this, ignore this e-mail; nothing changes.'
  return {
    to: input.to,
    subject,
    text: `${paragraphs.join('\n\n')}\n\nChoose a new password: ${input.link}\n\n${footer}\n`,
    html: layout(subject, paragraphs, { label: 'Choose a new password', url: input.link }, footer),
  }
}
