/** Conversions between the map's web-mercator geometries and the API's WGS-84 GeoJSON. */
import GeoJSON from 'ol/format/GeoJSON'
import type { Geometry } from 'ol/geom'

const geojson = new GeoJSON({ dataProjection: 'EPSG:4326', featureProjection: 'EPSG:3857' })

/** A map geometry as WGS-84 GeoJSON geometry (coordinates rounded to about 1 cm). */
export function toGeoJsonGeometry<T>(geometry: Geometry): T {
  return geojson.writeGeometryObject(geometry, { decimals: 7 }) as unknown as T
}

/** WGS-84 GeoJSON geometry -> map geometry. */
export function fromGeoJsonGeometry(geometry: unknown): Geometry {
  return geojson.readGeometry(geometry) as Geometry
}
