export type TextPart = { kind: 'text'; text: string } | { kind: 'link'; text: string; href: string }

const urlPattern = /https?:\/\/[^\s<>"')\]]+/g

/**
 * Splits plain text into text and http(s) links, so a template can render links as
 * anchors without `v-html`. Trailing punctuation stays outside the link.
 */
export function linkify(text: string): TextPart[] {
  const parts: TextPart[] = []
  let last = 0
  for (const match of text.matchAll(urlPattern)) {
    let url = match[0]
    const trailing = /[.,;:!?]+$/.exec(url)
    if (trailing) url = url.slice(0, -trailing[0].length)
    const start = match.index
    if (start > last) parts.push({ kind: 'text', text: text.slice(last, start) })
    parts.push({ kind: 'link', text: url, href: url })
    last = start + url.length
  }
  if (last < text.length) parts.push({ kind: 'text', text: text.slice(last) })
  return parts
}

/**
 * Prepares a received HTML mail for a sandboxed iframe: links open in a new tab (the
 * sandbox allows pop-ups only), and nothing else from the mail may run.
 */
export function mailSrcdoc(html: string): string {
  const head = '<base target="_blank"><meta name="referrer" content="no-referrer">' +
    '<style>body{font-family:system-ui,sans-serif;margin:12px;color:#1f2823}img{max-width:100%}</style>'
  return /<head[^>]*>/i.test(html) ? html.replace(/<head[^>]*>/i, (tag) => tag + head) : head + html
}
