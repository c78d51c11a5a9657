/**
 * Reading where a boundary problem is: the server's message may name a position
 * ("... crosses itself near 42.01234, -93.51234"); the order of the two numbers is
 * told by which reading lies closer to the field.
 */
export function positionFromMessage(text: string, near: [number, number] | null): [number, number] | null {
  // "near 42.0312 N, 93.6319 W": hemispheres say which number is which.
  const h = /(\d{1,3}(?:\.\d+)?)\s*°?\s*([NS])\s*,?\s*(\d{1,3}(?:\.\d+)?)\s*°?\s*([EW])/.exec(text)
  if (h) {
    const lat = Number(h[1]) * (h[2] === 'S' ? -1 : 1)
    const lon = Number(h[3]) * (h[4] === 'W' ? -1 : 1)
    if (Math.abs(lat) <= 90 && Math.abs(lon) <= 180) return [lon, lat]
  }
  const m = /(-?\d{1,3}\.\d{2,})\s*[,;\s]\s*(-?\d{1,3}\.\d{2,})/.exec(text)
  if (!m) return null
  const a = Number(m[1])
  const b = Number(m[2])
  const latLon: [number, number] = [b, a] // read as "lat, lon" -> [lon, lat]
  const lonLat: [number, number] = [a, b] // read as "lon, lat"
  const valid = (p: [number, number]) => Math.abs(p[0]) <= 180 && Math.abs(p[1]) <= 90
  if (!valid(latLon)) return valid(lonLat) ? lonLat : null
  if (!valid(lonLat)) return latLon
  if (!near) return /lon\s*,\s*lat|longitude\s*,\s*latitude/i.test(text) ? lonLat : latLon
  const d = (p: [number, number]) => Math.hypot(p[0] - near[0], p[1] - near[1])
  return d(lonLat) < d(latLon) ? lonLat : latLon
}

/** Positions given as data in an error (e.g. `{ at: [lon, lat] }` or `{ points: [[lon, lat], ...] }`). */
export function positionsFromData(data: unknown): [number, number][] {
  const out: [number, number][] = []
  const visit = (v: unknown, depth: number) => {
    if (depth > 4 || v === null || typeof v !== 'object') return
    if (Array.isArray(v)) {
      if (v.length >= 2 && typeof v[0] === 'number' && typeof v[1] === 'number' && Math.abs(v[0]) <= 180 && Math.abs(v[1]) <= 90) {
        out.push([v[0], v[1]])
        return
      }
      for (const item of v) visit(item, depth + 1)
      return
    }
    const o = v as Record<string, unknown>
    if (typeof o.lonDeg === 'number' && typeof o.latDeg === 'number') {
      out.push([o.lonDeg, o.latDeg])
      return
    }
    if (typeof o.lon === 'number' && typeof o.lat === 'number') {
      out.push([o.lon, o.lat])
      return
    }
    for (const key of ['at', 'point', 'points', 'position', 'positions', 'coordinates', 'where', 'crossings']) {
      if (key in o) visit(o[key], depth + 1)
    }
  }
  visit(data, 0)
  return out
}
