import type { OrbitRecordProblem } from '@shared/schemas/orbits'

/**
 * The per-record problems of a refused orbit upload. The server names them in the error's
 * `fields` as `{ "record 3": "line 7 (GPS BIIR-2): line 2 checksum is 5, computed 3" }`
 * next to `file` (the overall sentence); this turns them into table rows.
 */
export function problemsFromFields(fields: Record<string, string> | undefined): OrbitRecordProblem[] {
  if (!fields) return []
  const rows: OrbitRecordProblem[] = []
  for (const [key, text] of Object.entries(fields)) {
    if (!/^record\s+\d+/i.test(key)) continue
    rows.push(readProblem(key, text))
  }
  return rows.sort((a, b) => recordNumber(a.record) - recordNumber(b.record))
}

/** "line 7 (GPS BIIR-2 (PRN 13)): message" -> line 7, the satellite, the message. */
function readProblem(key: string, text: string): OrbitRecordProblem {
  const head = /^line\s+(\d+)\s*/i.exec(text)
  if (!head) return { record: key, line: 0, message: text }
  let rest = text.slice(head[0].length)
  let satellite = ''
  if (rest.startsWith('(')) {
    // The satellite's name may hold parentheses of its own: find the matching one.
    let depth = 0
    let end = -1
    for (let i = 0; i < rest.length; i++) {
      if (rest[i] === '(') depth++
      else if (rest[i] === ')' && --depth === 0) {
        end = i
        break
      }
    }
    if (end > 0) {
      satellite = rest.slice(1, end)
      rest = rest.slice(end + 1)
    }
  }
  const message = rest.replace(/^\s*:\s*/, '')
  return { record: satellite ? `${key} (${satellite})` : key, line: Number(head[1]), message }
}

function recordNumber(record: string): number {
  return Number(/\d+/.exec(record)?.[0] ?? 0)
}

/** "3.2 days" / "5 hours" / "12 days" for an element age given in days. */
export function formatAgeDays(ageDays: number | null | undefined): string {
  if (ageDays === null || ageDays === undefined || !Number.isFinite(ageDays)) return '—'
  if (ageDays < 1) {
    const hours = Math.round(ageDays * 24)
    return `${hours} ${hours === 1 ? 'hour' : 'hours'}`
  }
  const days = ageDays < 10 ? Math.round(ageDays * 10) / 10 : Math.round(ageDays)
  return `${days} ${days === 1 ? 'day' : 'days'}`
}
