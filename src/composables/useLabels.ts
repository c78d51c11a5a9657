import type { Role, UnitSystem } from '@shared/schemas'

const roleLabels: Record<Role, string> = {
  admin: 'Admin',
  office: 'Office',
  contractor: 'Contractor',
  client: 'Farm client',
}

/** The words shown for a role. */
export function roleLabel(role: Role): string {
  return roleLabels[role]
}

export const roleOptions = (Object.keys(roleLabels) as Role[]).map((value) => ({ value, label: roleLabels[value] }))

export const unitLabels: Record<UnitSystem, string> = {
  metric: 'Metric (ha, m, cm)',
  imperial: 'Imperial (ac, ft, in)',
}

/** A date-time for tables and mail lists, in the viewer's locale and time zone. */
export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '—'
  const date = new Date(iso)
  if (Number.isNaN(date.getTime())) return '—'
  return date.toLocaleString(undefined, { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' })
}

/** A byte count as kB / MB. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} kB`
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`
}
