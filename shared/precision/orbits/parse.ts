/**
 * Reading an orbit file whatever its format: the format is told from the content.
 *
 * Sources: the formats' own documents, named in tle.ts (Spacetrack Report #3; AIAA
 * 2006-6753), omm.ts (CCSDS 502.0-B-3) and yuma.ts (the US Coast Guard Navigation
 * Center's YUMA layout; IS-GPS-200). Telling them apart by their first characters ('{'
 * or '[' JSON, '<' XML), a YUMA header or 'ID:' line, else TLE, is common practice.
 */
import type { GnssSystem } from '../systems'
import { parseOmmJson, parseOmmXml } from './omm'
import { parseTle } from './tle'
import type { OrbitParseResult } from './types'
import { parseYuma } from './yuma'

/** Tells the format of orbit text from its content. */
export function detectOrbitFormat(text: string): OrbitParseResult['format'] {
  const t = text.replace(/^\uFEFF/, '').trimStart()
  if (t.startsWith('{') || t.startsWith('[')) return 'omm-json'
  if (t.startsWith('<')) return 'omm-xml'
  if (/^\*{3,}.*almanac/im.test(t) || /^\s*ID:\s*\d+/im.test(t)) return 'yuma'
  return 'tle'
}

/**
 * Parses the text of an orbit file (TLE / 3LE, CCSDS OMM JSON or XML, GPS YUMA
 * almanac) into satellites plus a per-record report. Bad records are listed in
 * `errors` (record number, line, reason) and skipped; the good ones are returned.
 * `options.system` assigns one constellation to every TLE/OMM record of the file;
 * otherwise it comes from the object name, and satellites whose constellation cannot
 * be told are kept as `Other` and listed in `notes`.
 *
 * @example
 * const { satellites, errors } = parseOrbitFile(tleText)
 * if (errors.length) console.warn(`${errors.length} records skipped`, errors)
 */
export function parseOrbitFile(text: string, options: { system?: GnssSystem } = {}): OrbitParseResult {
  const clean = text.replace(/^\uFEFF/, '')
  const format = detectOrbitFormat(clean)
  const r =
    format === 'omm-json'
      ? parseOmmJson(clean, options)
      : format === 'omm-xml'
        ? parseOmmXml(clean, options)
        : format === 'yuma'
          ? parseYuma(clean)
          : parseTle(clean, options)
  return { format, satellites: r.satellites, errors: r.errors, notes: r.notes, skipped: r.errors.length }
}

/** One line per issue: "record 3, line 7 (GPS BIIR-2): line 2 checksum is 5, computed 3". */
export function formatOrbitIssue(i: { record: number; line: number; satellite?: string; message: string }): string {
  return `record ${i.record}, line ${i.line}${i.satellite ? ` (${i.satellite})` : ''}: ${i.message}`
}
