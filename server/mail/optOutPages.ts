// The small public pages behind the opt-out link of the weekly plan e-mails: the question
// (with a form that posts the token back; nothing changes on GET), the confirmation, and
// a link that does not work. Plain HTML in the e-mails' colours, no script.
import { escapeHtml } from './templates.ts'

function page(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(title)}</title></head>
<body style="margin:0;padding:16px;background:#f4f1ea;font-family:'Open Sans',Arial,sans-serif;color:#1f2a36;line-height:1.5">
<main style="max-width:480px;margin:2em auto;background:#fff;border-radius:8px;padding:24px">
<h1 style="font-size:20px;margin:0 0 14px;color:#00204d">${escapeHtml(title)}</h1>
${body}
</main></body></html>`
}

const button = 'background:#00204d;color:#fff;border:0;border-radius:6px;padding:10px 18px;font-size:15px;cursor:pointer'

interface OptOutInfo {
  email: string
  farmName: string
}

/** The question: stop the weekly plans of this farm to this address? */
export function optOutQuestionPage(info: OptOutInfo, token: string): string {
  return page(
    'Stop receiving weekly plans?',
    `<p>The weekly plans of <strong>${escapeHtml(info.farmName)}</strong> will no longer be sent to <strong>${escapeHtml(info.email)}</strong>.</p>
<form method="post" action="opt-out"><input type="hidden" name="token" value="${escapeHtml(token)}"><button type="submit" style="${button}">Stop the weekly plans</button></form>
<p style="color:#5b6570;font-size:13px;margin-top:16px">You can ask the office to include you again at any time.</p>`,
  )
}

/** The address is opted out (`already`: it was before this visit). */
export function optedOutPage(info: OptOutInfo, already: boolean): string {
  const verb = already ? 'receives' : 'will receive'
  return page(
    'You are opted out',
    `<p>${escapeHtml(info.email)} ${verb} no more weekly plans of <strong>${escapeHtml(info.farmName)}</strong>.</p><p>To receive them again, ask the office.</p>`,
  )
}

/** The link is broken, expired or unknown; `message` says which. */
export function brokenLinkPage(message: string): string {
  return page('This link does not work', `<p>${escapeHtml(message)}</p>`)
}
