/**
 * The cividis colour ramp for continuous forecast figures.
 *
 * Source: J. R. Nuñez, C. R. Anderton, R. S. Renslow, "Optimizing colormaps with
 * consideration for color vision deficiency to enable accurate interpretation of
 * scientific data", PLOS ONE 13(7): e0199239 (2018). The published 256-entry table (as
 * shipped in matplotlib's `_cividis_data`) is kept here at every 16th entry plus the
 * entries around its two bends (20, 24 at the dark end; 248, 252 at the bright end).
 * Values in between are interpolated linearly in sRGB; the unit tests check that this
 * stays within 3/255 of table entries that are not kept.
 */

/** Table indices (of 0..255) of the kept entries. */
const indices = [0, 16, 20, 24, 32, 48, 64, 80, 96, 112, 128, 144, 160, 176, 192, 208, 224, 240, 248, 252, 255]

/** [r, g, b] in 0..1 at those indices, copied from the published table. */
const stops: readonly (readonly [number, number, number])[] = [
  [0.0, 0.135112, 0.304751],
  [0.0, 0.178802, 0.414764],
  [0.0, 0.188769, 0.439563],
  [0.017852, 0.198528, 0.441248],
  [0.103401, 0.220406, 0.43579],
  [0.195057, 0.264372, 0.425924],
  [0.263738, 0.307831, 0.422789],
  [0.32425, 0.351289, 0.42625],
  [0.38083, 0.395164, 0.435653],
  [0.435168, 0.439763, 0.451134],
  [0.488697, 0.485318, 0.471008],
  [0.54784, 0.531895, 0.471704],
  [0.609105, 0.579816, 0.463638],
  [0.671991, 0.629316, 0.448018],
  [0.736488, 0.680629, 0.424028],
  [0.802667, 0.733978, 0.390153],
  [0.870717, 0.789572, 0.343333],
  [0.941147, 0.84753, 0.275815],
  [0.97778, 0.877281, 0.227954],
  [0.994847, 0.892954, 0.203445],
  [0.995737, 0.909344, 0.217772],
]
const positions = indices.map((i) => i / 255)

function clamp01(t: number): number {
  if (!Number.isFinite(t)) return 0
  return Math.min(1, Math.max(0, t))
}

/**
 * The ramp colour at t in 0..1 (0 = dark blue, 1 = yellow) as [r, g, b] in 0..255.
 * @example cividisRgb(0) // -> [0, 34, 78]
 */
export function cividisRgb(t: number): [number, number, number] {
  const x = clamp01(t)
  let k = 0
  while (k < positions.length - 2 && x > positions[k + 1]) k++
  const span = positions[k + 1] - positions[k]
  const f = span > 0 ? (x - positions[k]) / span : 0
  const a = stops[k]
  const b = stops[k + 1]
  return [0, 1, 2].map((c) => Math.round((a[c] + (b[c] - a[c]) * f) * 255)) as [number, number, number]
}

/** The ramp colour at t as a CSS hex colour. @example cividis(1) // -> '#fee838' */
export function cividis(t: number): string {
  return '#' + cividisRgb(t).map((v) => v.toString(16).padStart(2, '0')).join('')
}

/**
 * Black or white text, whichever reads better on a ramp colour (WCAG relative luminance).
 * @example textOnCividis(0) // -> '#ffffff'
 */
export function textOnCividis(t: number): string {
  const [r, g, b] = cividisRgb(t).map((v) => {
    const s = v / 255
    return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4
  })
  const luminance = 0.2126 * r + 0.7152 * g + 0.0722 * b
  return luminance > 0.22 ? '#1f2823' : '#ffffff'
}

/** CSS linear-gradient of the ramp, left to right (reversed: yellow to dark blue). */
export function cividisGradient(reversed = false): string {
  const parts = stops.map((_, i) => {
    const t = positions[i]
    return `${cividis(reversed ? 1 - t : t)} ${(t * 100).toFixed(1)}%`
  })
  return `linear-gradient(to right, ${parts.join(', ')})`
}
