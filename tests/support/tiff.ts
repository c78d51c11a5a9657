import proj4 from 'proj4'
import { writeArrayBuffer } from 'geotiff'


// GeoTIFFs for the tests. A plain baseline TIFF without any geo tags (TIFF 6.0, Adobe 1992: header, one IFD,
// 8-bit grayscale, one uncompressed strip), for the "TIFF without georeferencing" cases.
// (The geotiff package's writer always adds geo keys, so this one is built by hand.)
export function plainTiff(width = 2, height = 2): Uint8Array {
  const entries: Array<[tag: number, type: number, value: number]> = [
    [256, 3, width], // ImageWidth, SHORT
    [257, 3, height], // ImageLength
    [258, 3, 8], // BitsPerSample
    [259, 3, 1], // Compression: none
    [262, 3, 1], // PhotometricInterpretation: BlackIsZero
    [273, 4, 0], // StripOffsets, LONG (filled below)
    [278, 3, height], // RowsPerStrip
    [279, 4, width * height], // StripByteCounts
  ]
  const ifdSize = 2 + entries.length * 12 + 4
  const dataOffset = 8 + ifdSize
  const buf = new ArrayBuffer(dataOffset + width * height)
  const v = new DataView(buf)
  v.setUint8(0, 0x49)
  v.setUint8(1, 0x49)
  v.setUint16(2, 42, true)
  v.setUint32(4, 8, true)
  v.setUint16(8, entries.length, true)
  entries.forEach(([tag, type, value], i) => {
    const o = 10 + i * 12
    v.setUint16(o, tag, true)
    v.setUint16(o + 2, type, true)
    v.setUint32(o + 4, 1, true)
    if (type === 3) v.setUint16(o + 8, value, true)
    else v.setUint32(o + 8, tag === 273 ? dataOffset : value, true)
  })
  v.setUint32(10 + entries.length * 12, 0, true)
  for (let i = 0; i < width * height; i++) v.setUint8(dataOffset + i, i * 40)
  return new Uint8Array(buf)
}

/** Size of a test GeoTIFF: cells across and down, cell size (m). */
export interface TiffGrid {
  width: number
  height: number
  cellM: number
}

/**
 * A GeoTIFF in the WGS 84 UTM zone of (lonDeg, latDeg) (north), centred on that point and
 * written by geotiff.writeArrayBuffer: heights heightAt(e, n, cell) at the cell centres, e and
 * n the UTM easting and northing (m) relative to the point's own, cell the row-major index
 * (row 0 north); NaN becomes nodata (-9999).
 */
export function utmTiff(lonDeg: number, latDeg: number, heightAt: (eM: number, nM: number, cell: number) => number, size: TiffGrid = { width: 60, height: 50, cellM: 25 }) {
  const zone = Math.floor((lonDeg + 180) / 6) + 1
  const UTM = `+proj=utm +zone=${zone} +datum=WGS84 +units=m +no_defs`
  const { width, height, cellM: cell } = size
  const [E0, N0] = proj4('+proj=longlat +datum=WGS84 +no_defs', UTM, [lonDeg, latDeg])
  const left = Math.round(E0) - (width / 2) * cell
  const top = Math.round(N0) + (height / 2) * cell
  const values = new Float32Array(width * height)
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const v = heightAt(left + (i + 0.5) * cell - E0, top - (j + 0.5) * cell - N0, j * width + i)
      values[j * width + i] = Number.isNaN(v) ? -9999 : v
    }
  }
  const meta: Record<string, unknown> = { width, height, BitsPerSample: [32], SampleFormat: [3], GDAL_NODATA: '-9999' }
  Object.assign(meta, {
    ModelPixelScale: [cell, cell, 0],
    ModelTiepoint: [0, 0, 0, left, top, 0],
    GTModelTypeGeoKey: 1,
    GTRasterTypeGeoKey: 1,
    ProjectedCSTypeGeoKey: 32600 + zone,
  })
  const bytes = new Uint8Array(writeArrayBuffer(values, meta as Parameters<typeof writeArrayBuffer>[1]))
  return { bytes, E0, N0, left, top, cell, width, height }
}

/** A GeoTIFF of 60 x 50 cells of 25 m (utmTiff) around (lonDeg, latDeg): a tilted plane h = 400 + 0.01 (E - E0) - 0.02 (N - N0), one nodata cell (the fourth of the first row). */
export function planeTiff(lonDeg = 9.4, latDeg = 47.2) {
  return utmTiff(lonDeg, latDeg, (e, n, cell) => (cell === 3 ? NaN : 400 + 0.01 * e - 0.02 * n))
}
