/**
 * The correction sources on the Fields map: each RTK base as a violet square with its radio
 * range as a ring (a geodesic circle on the WGS-84 sphere approximation of ol/geom/Polygon
 * `circular`, accurate to a fraction of a percent at these ranges), each network's coverage
 * outline dashed and its mount points as small squares. Labels name each source.
 */
import Feature from 'ol/Feature'
import { Point, Polygon } from 'ol/geom'
import { circular } from 'ol/geom/Polygon'
import VectorLayer from 'ol/layer/Vector'
import { fromLonLat } from 'ol/proj'
import VectorSource from 'ol/source/Vector'
import { Fill, RegularShape, Stroke, Style, Text } from 'ol/style'
import type { CorrectionSources } from '@shared/schemas/corrections'

const VIOLET = '#5b2d83'
const label = (text: string, offsetY: number) =>
  new Text({ text, font: '600 11px "Open Sans", system-ui, sans-serif', fill: new Fill({ color: VIOLET }), stroke: new Stroke({ color: '#fff', width: 3 }), offsetY })

const styles = {
  base: (name: string) =>
    new Style({ image: new RegularShape({ points: 4, radius: 7, angle: Math.PI / 4, fill: new Fill({ color: VIOLET }), stroke: new Stroke({ color: '#fff', width: 1.5 }) }), text: label(name, -14) }),
  ring: (text: string) => new Style({ stroke: new Stroke({ color: VIOLET, width: 1.5, lineDash: [6, 4] }), text: new Text({ ...label(text, 0), placement: 'line' } as never) }),
  coverage: (name: string) => new Style({ stroke: new Stroke({ color: VIOLET, width: 1.5, lineDash: [2, 5] }), fill: new Fill({ color: 'rgba(91, 45, 131, 0.04)' }), text: label(name, 0) }),
  mount: (name: string) => new Style({ image: new RegularShape({ points: 4, radius: 4, angle: Math.PI / 4, fill: new Fill({ color: '#fff' }), stroke: new Stroke({ color: VIOLET, width: 1.5 }) }), text: label(name, -10) }),
}

export function createCorrectionLayer() {
  const source = new VectorSource()
  const layer = new VectorLayer({ source, zIndex: 5, declutter: false })

  function setSources(s: CorrectionSources): void {
    source.clear()
    for (const b of s.bases) {
      const point = new Feature(new Point(fromLonLat([b.lonDeg, b.latDeg])))
      point.setStyle(styles.base(b.name))
      point.set('baseStationId', b.id)
      const ring = new Feature(circular([b.lonDeg, b.latDeg], b.radioRangeKm * 1000, 128).transform('EPSG:4326', 'EPSG:3857'))
      ring.setStyle(styles.ring(`${b.name}: ${b.radioRangeKm} km radio range`))
      ring.set('rangeRingOf', b.id)
      source.addFeatures([point, ring])
    }
    for (const n of s.networks) {
      if (n.coverage) {
        const poly = new Feature(new Polygon(n.coverage.coordinates.map((r) => r.map((p) => fromLonLat(p)))))
        poly.setStyle(styles.coverage(n.name))
        source.addFeature(poly)
      }
      for (const m of n.mountPoints) {
        const f = new Feature(new Point(fromLonLat([m.lonDeg, m.latDeg])))
        f.setStyle(styles.mount(m.name))
        source.addFeature(f)
      }
    }
  }
  return { layer, setSources, source }
}
