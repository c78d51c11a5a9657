// The weekly plan e-mail of a farm: HTML (one narrow column of simple tables that reads on
// a phone) and plain text. A revision stores both with two kinds of placeholders that are
// filled per recipient when the message goes out (finalizePlanBody): field areas
// (⟦ha:12.5⟧ -> "12.5 ha" or "30.9 ac", the recipient's units) and the opt-out link
// (⟦opt-out⟧). Everything else is fixed at composition, so the stored revision plus the
// recipient reproduce the message exactly as it was sent.
import { escapeHtml } from './templates.ts'

/** The safety caution of the product; every plan e-mail carries it. */
export const SAFETY_CAUTION =
  'Forecasts cover satellite geometry and the obstructions that were drawn. They do not cover multipath, ' +
  'ionospheric storms, correction-link outages, receiver faults or unmapped obstacles. Auto-steer must be ' +
  'supervised. Drainage grades and levelling designs must be checked against local codes and by licensed practitioners.'

export const HA_PER_AC = 0.40468564224

export interface PlanPassLine {
  time: string
  field: string
  workType: string
  crew: string
  status: string
  atRisk: boolean
}

export interface PlanDay {
  label: string
  passes: PlanPassLine[]
}

export interface PlanFieldHours {
  name: string
  areaHa: number
  /** Per work type: compact local ranges of Clear hours, or null when no forecast covers the week. */
  workTypes: Array<{ name: string; ranges: string[] | null }>
}

export interface PlanRiskLine {
  when: string
  field: string
  workType: string
  reason: string
  suggestion: string | null
}

export interface PlanContent {
  businessName: string
  farmName: string
  /** e.g. "America/Chicago (CST)" */
  zoneLabel: string
  weekLabel: string
  note: string
  days: PlanDay[]
  fields: PlanFieldHours[]
  atRisk: PlanRiskLine[]
  forecastNote: string | null
  /** geomagnetic storm spans (G3 or worse) and a note when the Kp feed is stale or short */
  spaceWeather?: { storms: string[]; note: string | null }
}

/** The placeholder characters; user text never keeps them. */
const OPEN = '⟦'
const CLOSE = '⟧'
const clean = (text: string) => text.replaceAll(OPEN, '[').replaceAll(CLOSE, ']')
const h = (text: string) => escapeHtml(clean(text))
const area = (ha: number) => `${OPEN}ha:${Math.round(ha * 1000) / 1000}${CLOSE}`
const OPT_OUT = `${OPEN}opt-out${CLOSE}`

export function planSubject(c: Pick<PlanContent, 'farmName' | 'weekLabel'>): string {
  return clean(`Weekly plan for ${c.farmName}: ${c.weekLabel}`).slice(0, 300)
}

/**
 * The subject a revision of a week's plan is sent with: a later revision says so, so that
 * a client can tell it from the plan it replaces.
 * @example revisionSubject('Weekly plan for Oak Farm: 7-13 Dec 2026', 2) // -> '... (revised, version 2)'
 */
export function revisionSubject(subject: string, revision: number): string {
  return revision > 1 ? `${subject} (revised, version ${revision})` : subject
}

function formatAreaText(ha: number, units: 'metric' | 'imperial'): string {
  const fmt = (v: number) => v.toLocaleString('en-US', { maximumFractionDigits: 1, minimumFractionDigits: 0 })
  return units === 'imperial' ? `${fmt(ha / HA_PER_AC)} ac` : `${fmt(ha)} ha`
}

/**
 * Fills the placeholders of a stored body for one recipient.
 * @example finalizePlanBody('Field (⟦ha:10⟧)', { units: 'imperial', optOutUrl: 'u', html: false }) // -> 'Field (24.7 ac)'
 */
export function finalizePlanBody(body: string, r: { units: 'metric' | 'imperial'; optOutUrl: string; html: boolean }): string {
  return body.replace(/⟦(ha:[0-9.]+|opt-out)⟧/g, (_m, inner: string) => {
    if (inner === 'opt-out') return r.html ? escapeHtml(r.optOutUrl) : r.optOutUrl
    return formatAreaText(Number(inner.slice(3)), r.units)
  })
}

const css = {
  body: "margin:0;padding:12px;background:#f4f1ea;font-family:'Open Sans',Arial,sans-serif;color:#1f2a36;font-size:15px;line-height:1.45",
  card: 'max-width:600px;margin:0 auto;background:#ffffff;border-radius:8px;padding:18px',
  h1: 'font-size:20px;margin:0 0 4px;color:#00204d',
  h2: 'font-size:17px;margin:22px 0 8px;color:#00204d;border-bottom:2px solid #e6e0d2;padding-bottom:4px',
  h3: 'font-size:15px;margin:14px 0 6px;color:#1f2a36',
  muted: 'color:#5b6570;font-size:13px;margin:0 0 10px',
  note: 'background:#f7f3e8;border-left:4px solid #00204d;padding:10px 12px;margin:14px 0;white-space:pre-wrap',
  table: 'width:100%;border-collapse:collapse;margin:0 0 6px',
  th: 'text-align:left;font-size:12px;color:#5b6570;font-weight:600;padding:4px 6px;border-bottom:1px solid #e6e0d2',
  td: 'padding:6px;border-bottom:1px solid #eee9dc;vertical-align:top',
  time: 'padding:6px;border-bottom:1px solid #eee9dc;vertical-align:top;white-space:nowrap;font-weight:600',
  risk: 'display:inline-block;background:#6b1d0f;color:#ffffff;border-radius:4px;padding:0 6px;font-size:12px;font-weight:600',
  caution: 'background:#fbf3dc;border:1px solid #d9c58f;border-radius:6px;padding:10px 12px;margin:22px 0 0;font-size:13px',
  footer: 'color:#7a828a;font-size:12px;margin:16px 0 0',
  clear: 'display:inline-block;background:#00204d;color:#ffffff;border-radius:4px;padding:0 5px;font-size:11px;font-weight:600;margin-right:4px',
}

/** Fields with a forecast this week, and those without one (listed on one line). */
function splitFields(fields: PlanFieldHours[]) {
  const hasForecast = (f: PlanFieldHours) => f.workTypes.some((w) => w.ranges !== null)
  return { forecast: fields.filter(hasForecast), unforecast: fields.filter((f) => !hasForecast(f)) }
}

export function planHtml(c: PlanContent): string {
  const out: string[] = []
  out.push(`<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${h(planSubject(c))}</title></head>
<body style="${css.body}">
<div style="${css.card}">
<h1 style="${css.h1}">${h(c.farmName)}: plan for ${h(c.weekLabel)}</h1>
<p style="${css.muted}">From ${h(c.businessName)}. All times are farm time, ${h(c.zoneLabel)}.</p>`)
  if (c.note.trim()) out.push(`<div style="${css.note}">${h(c.note.trim())}</div>`)

  out.push(`<h2 style="${css.h2}">Passes this week</h2>`)
  const booked = c.days.filter((d) => d.passes.length > 0)
  if (booked.length === 0) out.push(`<p>No passes are booked for this week yet.</p>`)
  for (const day of booked) {
    out.push(`<h3 style="${css.h3}">${h(day.label)}</h3>
<table role="presentation" style="${css.table}"><tr><th style="${css.th}">Time</th><th style="${css.th}">Work</th><th style="${css.th}">Machine and crew</th></tr>`)
    for (const p of day.passes) {
      const risk = p.atRisk ? ` <span style="${css.risk}">At risk</span>` : ''
      out.push(
        `<tr><td style="${css.time}">${h(p.time)}</td><td style="${css.td}"><strong>${h(p.workType)}</strong>${risk}<br>${h(p.field)}<br><span style="color:#5b6570;font-size:13px">${h(p.status)}</span></td><td style="${css.td}">${h(p.crew)}</td></tr>`,
      )
    }
    out.push('</table>')
  }

  if (c.atRisk.length) {
    out.push(`<h2 style="${css.h2}">Passes at risk</h2>
<p style="margin:0 0 8px">The latest forecast no longer gives these passes the precision they need. We will move them or confirm them with you.</p>
<table role="presentation" style="${css.table}"><tr><th style="${css.th}">When</th><th style="${css.th}">Pass and reason</th></tr>`)
    for (const r of c.atRisk) {
      out.push(
        `<tr><td style="${css.time}">${h(r.when)}</td><td style="${css.td}"><strong>${h(r.workType)}</strong>, ${h(r.field)}<br>${h(r.reason)}${r.suggestion ? `<br>Better start: ${h(r.suggestion)}` : ''}</td></tr>`,
      )
    }
    out.push('</table>')
  }

  if (c.spaceWeather && (c.spaceWeather.storms.length || c.spaceWeather.note)) {
    out.push(`<h2 style="${css.h2}">Space weather</h2>`)
    if (c.spaceWeather.storms.length) {
      out.push(`<p style="margin:0 0 8px">A geomagnetic storm is forecast. Strong storms can stop RTK fixes for hours; RTK work in these hours may be Tight or Closed.</p>
<table role="presentation" style="${css.table}">${c.spaceWeather.storms.map((s) => `<tr><td style="${css.td}"><strong>Storm</strong> ${h(s)}</td></tr>`).join('')}</table>`)
    }
    if (c.spaceWeather.note) out.push(`<p style="${css.muted}">${h(c.spaceWeather.note)}</p>`)
  }

  out.push(`<h2 style="${css.h2}">Good hours for precision work</h2>
<p style="margin:0 0 8px">Hours when the forecast is Clear: the satellites give the precision each kind of work needs on the field, with a margin.</p>`)
  if (c.forecastNote) out.push(`<p style="${css.muted}">${h(c.forecastNote)}</p>`)
  if (c.fields.length === 0) out.push('<p>This farm has no fields yet.</p>')
  const { forecast, unforecast } = splitFields(c.fields)
  for (const f of forecast) {
    out.push(`<h3 style="${css.h3}">${h(f.name)} <span style="color:#5b6570;font-weight:400">(${area(f.areaHa)})</span></h3>`)
    const open = f.workTypes.filter((w) => w.ranges && w.ranges.length)
    if (open.length) {
      out.push(`<table role="presentation" style="${css.table}">`)
      for (const w of open) {
        out.push(`<tr><td style="${css.td};width:38%"><span style="${css.clear}">Clear</span> ${h(w.name)}</td><td style="${css.td}">${w.ranges!.map(h).join('<br>')}</td></tr>`)
      }
      out.push('</table>')
    }
    const none = f.workTypes.filter((w) => w.ranges && !w.ranges.length).map((w) => w.name)
    if (none.length) out.push(`<p style="${css.muted}">No Clear hours this week for ${h(none.join(', '))}.</p>`)
  }
  if (unforecast.length) {
    out.push(`<p style="${css.muted}">No forecast yet for ${unforecast.map((f) => `${h(f.name)} (${area(f.areaHa)})`).join(', ')}.</p>`)
  }

  out.push(`<div style="${css.caution}"><strong>Please note.</strong> ${h(SAFETY_CAUTION)}</div>
<p style="${css.footer}">The attached calendar file (.ics) holds this week's passes; open it to add them to your phone's calendar.</p>
<p style="${css.footer}">You receive this plan because you are listed for ${h(c.farmName)}. <a href="${OPT_OUT}" style="color:#00204d">Stop receiving these plans</a>.</p>
</div></body></html>`)
  return out.join('\n')
}

export function planText(c: PlanContent): string {
  const out: string[] = []
  out.push(`${clean(c.farmName)}: plan for ${clean(c.weekLabel)}`)
  out.push(`From ${clean(c.businessName)}. All times are farm time, ${clean(c.zoneLabel)}.`)
  if (c.note.trim()) out.push('', clean(c.note.trim()))
  out.push('', 'PASSES THIS WEEK')
  const booked = c.days.filter((d) => d.passes.length > 0)
  if (booked.length === 0) out.push('No passes are booked for this week yet.')
  for (const day of booked) {
    out.push('', clean(day.label))
    for (const p of day.passes) {
      out.push(`  ${clean(p.time)}  ${clean(p.workType)}, ${clean(p.field)}${p.atRisk ? ' (AT RISK)' : ''}`)
      out.push(`      ${clean(p.crew)}; ${clean(p.status)}`)
    }
  }
  if (c.atRisk.length) {
    out.push('', 'PASSES AT RISK', 'The latest forecast no longer gives these passes the precision they need.')
    for (const r of c.atRisk) {
      out.push(`  ${clean(r.when)}  ${clean(r.workType)}, ${clean(r.field)}: ${clean(r.reason)}${r.suggestion ? ` Better start: ${clean(r.suggestion)}` : ''}`)
    }
  }
  if (c.spaceWeather && (c.spaceWeather.storms.length || c.spaceWeather.note)) {
    out.push('', 'SPACE WEATHER')
    if (c.spaceWeather.storms.length) out.push('A geomagnetic storm is forecast; RTK work in these hours may be Tight or Closed.')
    for (const s of c.spaceWeather.storms) out.push(`  STORM ${clean(s)}`)
    if (c.spaceWeather.note) out.push(clean(c.spaceWeather.note))
  }
  out.push('', 'GOOD HOURS FOR PRECISION WORK (Clear)')
  if (c.forecastNote) out.push(clean(c.forecastNote))
  if (c.fields.length === 0) out.push('This farm has no fields yet.')
  const { forecast, unforecast } = splitFields(c.fields)
  for (const f of forecast) {
    out.push('', `${clean(f.name)} (${area(f.areaHa)})`)
    for (const w of f.workTypes) if (w.ranges && w.ranges.length) out.push(`  ${clean(w.name)}: ${w.ranges.map(clean).join(', ')}`)
    const none = f.workTypes.filter((w) => w.ranges && !w.ranges.length).map((w) => w.name)
    if (none.length) out.push(`  No Clear hours for ${clean(none.join(', '))}`)
  }
  if (unforecast.length) out.push('', `No forecast yet for ${unforecast.map((f) => `${clean(f.name)} (${area(f.areaHa)})`).join(', ')}.`)
  out.push('', `PLEASE NOTE: ${SAFETY_CAUTION}`)
  out.push('', "The attached calendar file (.ics) holds this week's passes.")
  out.push(`To stop receiving these plans for ${clean(c.farmName)}, open: ${OPT_OUT}`)
  return `${out.join('\n')}\n`
}
