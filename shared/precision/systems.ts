/**
 * Satellite constellations (systems) and how a record's name tells its system.
 *
 * The name patterns follow the usual naming of public element sets: "GPS BIIR-2
 * (PRN 13)", "NAVSTAR 43", "COSMOS 2425 (716)" for GLONASS (the three-digit number in
 * parentheses is the GLONASS system number), "GSAT0101 (GALILEO-PFM)", "BEIDOU-3 M1",
 * "QZS-1 (MICHIBIKI-1)" (common practice of element-set publishers; from memory).
 */
export const GNSS_SYSTEMS = ['GPS', 'GLONASS', 'Galileo', 'BeiDou', 'QZSS', 'SBAS', 'Other'] as const

/** A constellation. A satellite whose constellation cannot be told is `Other`. */
export type GnssSystem = (typeof GNSS_SYSTEMS)[number]

/** Parses a system name case-insensitively ('gps', 'Galileo', 'BDS', ...); null if unknown. */
export function parseSystemName(text: string): GnssSystem | null {
  const t = text.trim().toLowerCase()
  switch (t) {
    case 'gps':
    case 'navstar':
      return 'GPS'
    case 'glonass':
    case 'glo':
      return 'GLONASS'
    case 'galileo':
    case 'gal':
      return 'Galileo'
    case 'beidou':
    case 'bds':
    case 'compass':
      return 'BeiDou'
    case 'qzss':
      return 'QZSS'
    case 'sbas':
      return 'SBAS'
    case 'other':
      return 'Other'
    default:
      return null
  }
}

/** Tells the system from an object name; null when the name says nothing. */
export function systemFromObjectName(name: string): GnssSystem | null {
  const n = name.toUpperCase()
  if (/\bGPS\b|NAVSTAR/.test(n)) return 'GPS'
  if (/GLONASS|COSMOS \d+ \(\d{3}[A-Z]?\)/.test(n)) return 'GLONASS'
  if (/GALILEO|GSAT0\d{3}/.test(n)) return 'Galileo'
  if (/BEIDOU|COMPASS|\bBDS\b/.test(n)) return 'BeiDou'
  if (/\bQZS|MICHIBIKI/.test(n)) return 'QZSS'
  if (/\bSBAS\b|\bWAAS\b|EGNOS|GAGAN|\bMSAS\b|\bSDCM\b/.test(n)) return 'SBAS'
  return null
}
