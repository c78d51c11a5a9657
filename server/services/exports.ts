// CSV export of a farm's passes: farm-local times, areas in the user's units (ha or ac).
// CSV as RFC 4180 describes it: CRLF line ends, fields with a comma, quote or line break
// in double quotes, quotes doubled. A UTF-8 byte order mark lets spreadsheet programs
// read non-ASCII names correctly (common practice).
import { DateTime } from 'luxon'
import { MINUTE_MS } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { PassCsvQuery } from '../../shared/schemas/passes.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { PassDetailRow } from '../db/repositories/passes.ts'
import { notFound } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'

/** Hectares per international acre: 1 ac = 4046.8564224 m^2 (NIST Handbook 44, Appendix C). */
export const HA_PER_ACRE = 0.40468564224

/** One CSV field (RFC 4180 quoting). Text that a spreadsheet would run as a formula is prefixed with ' (common practice). */
export function csvField(value: string | number | null, text = true): string {
  let s = value === null ? '' : String(value)
  if (text && /^[=+\-@\t\r]/.test(s)) s = `'${s}`
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
}

const local = (ms: number, zone: string) => DateTime.fromMillis(ms, { zone }).setLocale('en-US').toFormat('yyyy-MM-dd HH:mm ZZZZ')

export function passesCsvText(rows: PassDetailRow[], units: 'metric' | 'imperial'): string {
  const areaHeader = units === 'imperial' ? 'Area (ac)' : 'Area (ha)'
  const header = [
    'Start (farm time)',
    'End (farm time)',
    'Time zone',
    'Start (UTC)',
    'Field',
    areaHeader,
    'Work type',
    'Machine',
    'Crew',
    'Duration (h)',
    'Status',
    'At risk',
    'At-risk reason',
    'Suggested start (farm time)',
    'Notes',
  ]
  const lines = [header.map((h) => csvField(h)).join(',')]
  for (const r of rows) {
    const start = r.startAt.getTime()
    const end = start + r.durationMin * MINUTE_MS
    const area = units === 'imperial' ? r.fieldAreaHa / HA_PER_ACRE : r.fieldAreaHa
    lines.push(
      [
        csvField(local(start, r.timeZone)),
        csvField(local(end, r.timeZone)),
        csvField(r.timeZone),
        csvField(r.startAt.toISOString()),
        csvField(r.fieldName),
        csvField(area.toFixed(2), false),
        csvField(r.workTypeName),
        csvField(r.machineName),
        csvField(r.crew),
        csvField((r.durationMin / 60).toFixed(2), false),
        csvField(r.status),
        csvField(r.atRisk ? 'yes' : 'no'),
        csvField(r.atRiskReason),
        csvField(r.suggestedStartAt ? local(r.suggestedStartAt.getTime(), r.timeZone) : null),
        csvField(r.notes),
      ].join(','),
    )
  }
  return `\uFEFF${lines.join('\r\n')}\r\n`
}

const slug = (name: string) =>
  name
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60) || 'farm'

export function createExportsService(ctx: ServiceContext) {
  const { store } = ctx
  return {
    /** Planned, confirmed and done passes of one farm overlapping [from, to). */
    async passesCsv(user: SessionUser, query: PassCsvQuery): Promise<{ filename: string; content: string }> {
      assertFarmVisible(user, query.farmId)
      const farm = await store.repos.farms.findById(query.farmId)
      if (!farm) throw notFound('The farm')
      const rows = await store.repos.passes.list({
        farmId: farm.id,
        from: new Date(query.from),
        to: new Date(query.to),
        statuses: ['planned', 'confirmed', 'done'],
      })
      const fromDate = DateTime.fromISO(query.from, { zone: farm.timeZone }).toISODate()
      return { filename: `passes-${slug(farm.name)}-${fromDate}.csv`, content: passesCsvText(rows, user.units) }
    },
  }
}
export type ExportsService = ReturnType<typeof createExportsService>
