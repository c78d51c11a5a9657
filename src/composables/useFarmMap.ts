/**
 * The Fields page's OpenLayers map: layers for fields, obstructions, an upload preview
 * and markers; the drawing tools; vertex editing with snapping; conversions between the
 * map's web-mercator features and the API's WGS-84 GeoJSON.
 *
 * Offline by default: a plain background, a graticule, a scale line and a north arrow
 * (in the page's template). An imagery tile URL from config is drawn underneath when set.
 */
import { shallowRef, ref, type Ref } from 'vue'
import * as turf from '@turf/turf'
import OlMap from 'ol/Map'
import View from 'ol/View'
import Feature from 'ol/Feature'
import GeoJSON from 'ol/format/GeoJSON'
import VectorLayer from 'ol/layer/Vector'
import TileLayer from 'ol/layer/Tile'
import Graticule from 'ol/layer/Graticule'
import VectorSource from 'ol/source/Vector'
import XYZ from 'ol/source/XYZ'
import ScaleLine from 'ol/control/ScaleLine'
import Zoom from 'ol/control/Zoom'
import Attribution from 'ol/control/Attribution'
import { Draw, Modify, Select, Snap, defaults as defaultInteractions } from 'ol/interaction'
import { Point, Polygon, MultiPolygon, LineString, type Geometry } from 'ol/geom'
import { Stroke } from 'ol/style'
import { fromLonLat, toLonLat } from 'ol/proj'
import { createEmpty, extend, isEmpty } from 'ol/extent'
import { unByKey } from 'ol/Observable'
import { click } from 'ol/events/condition'
import type { EventsKey } from 'ol/events'
import type { FeatureCollection, LineString as GjLineString, Polygon as GjPolygon, MultiPolygon as GjMultiPolygon } from 'geojson'
import type { UnitSystem } from '@shared/schemas'
import type { Field, Obstruction } from '@shared/schemas/fields'
import type { ObstructionKind } from '@shared/precision'
import type { Boundary, ObstructionGeometry } from '@shared/schemas/geo'
import { config } from '@/config'
import { fieldStyle, markerStyle, obstructionStyle, previewStyle } from '@/components/map/styles'

export type MapTool = 'select' | 'draw-field' | 'add-part' | 'cut-hole' | 'tree-line' | 'woodlot' | 'building' | 'sky-check'

export type MapFeature = Feature<Geometry>

const geojson = new GeoJSON({ dataProjection: 'EPSG:4326', featureProjection: 'EPSG:3857' })

/** Area (ha) of a WGS-84 polygon or multipolygon, on the ellipsoid-free sphere turf uses. */
export function areaHaOf(boundary: Boundary | GjPolygon | GjMultiPolygon): number {
  return turf.area(boundary as GjPolygon) / 10_000
}

/** A map geometry as WGS-84 GeoJSON geometry (coordinates rounded to about 1 cm). */
export function toGeoJsonGeometry<T>(geometry: Geometry): T {
  const g = geojson.writeGeometryObject(geometry, { decimals: 7 }) as unknown as T
  return g
}

/** WGS-84 GeoJSON geometry -> map geometry. */
export function fromGeoJsonGeometry(geometry: unknown): Geometry {
  return geojson.readGeometry(geometry) as Geometry
}

/** Self-crossings of a boundary as [lon, lat] points (turf `kinks`). */
export function boundaryCrossings(boundary: Boundary): [number, number][] {
  const polys = boundary.type === 'Polygon' ? [boundary.coordinates] : boundary.coordinates
  const out: [number, number][] = []
  for (const coords of polys) {
    const k = turf.kinks(turf.polygon(coords))
    for (const p of k.features) out.push(p.geometry.coordinates as [number, number])
  }
  return out
}

export interface FarmMapOptions {
  units: () => UnitSystem
  /** A field or obstruction was picked on the map (null: nothing). */
  onSelect: (feature: MapFeature | null) => void
  /** A new field boundary or obstruction was drawn. */
  onDrawn: (feature: MapFeature, tool: MapTool) => void
  /** The selected feature's geometry changed (vertex moved, part added, hole cut). */
  onGeometryEdited: (feature: MapFeature) => void
  /** Sky-check mode: a point was clicked ([lon, lat]). */
  onSkyPoint: (lonLat: [number, number]) => void
  /** A short message for the user (e.g. "select a field first"). */
  onHint: (text: string) => void
}

export function useFarmMap(options: FarmMapOptions) {
  const tool: Ref<MapTool> = ref('select')
  const selected = shallowRef<MapFeature | null>(null)
  /** Area (ha) of the boundary being drawn, while it is drawn. */
  const sketchAreaHa = ref<number | null>(null)
  /** Length (m) of the tree line being drawn. */
  const sketchLengthM = ref<number | null>(null)
  /** Bumped whenever an obstruction changes (geometry or height): the sky check listens. */
  const obstructionRevision = ref(0)
  /** Bumped whenever a field changes. */
  const fieldRevision = ref(0)

  const fieldSource = new VectorSource<MapFeature>()
  const obstructionSource = new VectorSource<MapFeature>()
  const previewSource = new VectorSource<MapFeature>()
  const markerSource = new VectorSource<MapFeature>()

  const selectedId = () => selected.value?.getId()
  const fieldLayer = new VectorLayer({ source: fieldSource, style: fieldStyle(options.units, selectedId), zIndex: 10, declutter: 'labels' })
  const obstructionLayer = new VectorLayer({ source: obstructionSource, style: obstructionStyle(options.units, selectedId), zIndex: 20, declutter: 'labels' })
  const previewLayer = new VectorLayer({ source: previewSource, style: previewStyle, zIndex: 30 })
  const markerLayer = new VectorLayer({ source: markerSource, style: markerStyle, zIndex: 40 })

  let map: OlMap | null = null
  let draw: Draw | null = null
  const keys: EventsKey[] = []
  let newCounter = 0

  const select = new Select({
    layers: [fieldLayer, obstructionLayer],
    condition: click,
    hitTolerance: 6,
    // The layers' own styles show the selection, so the Select overlay draws nothing.
    style: null,
  })
  const modify = new Modify({ features: select.getFeatures(), pixelTolerance: 10 })
  const snaps = [new Snap({ source: fieldSource, pixelTolerance: 10 }), new Snap({ source: obstructionSource, pixelTolerance: 10 })]

  select.on('select', () => {
    const picked = select.getFeatures().item(0) ?? null
    setSelected(picked)
    options.onSelect(picked)
  })
  modify.on('modifyend', (event) => {
    const feature = event.features.item(0) as MapFeature | undefined
    if (feature) {
      feature.set('dirty', true)
      options.onGeometryEdited(feature)
    }
  })

  // Geometry changes of any field recompute its live area; of any obstruction, the revision.
  function watchFeature(feature: MapFeature, role: 'field' | 'obstruction'): void {
    const onGeometry = () => {
      if (role === 'field') {
        const g = feature.getGeometry()
        if (g) feature.set('areaHa', areaHaOf(toGeoJsonGeometry<Boundary>(g)), true)
        fieldRevision.value++
      } else {
        obstructionRevision.value++
      }
    }
    keys.push(feature.on('change', onGeometry))
    if (role === 'obstruction') keys.push(feature.on('propertychange', () => obstructionRevision.value++))
  }

  function setSelected(feature: MapFeature | null): void {
    selected.value = feature
    const features = select.getFeatures()
    if (feature === null) features.clear()
    else if (features.item(0) !== feature) {
      features.clear()
      features.push(feature)
    }
    fieldLayer.changed()
    obstructionLayer.changed()
  }

  function mount(target: HTMLElement): void {
    const layers = []
    if (config.mapTileUrl) {
      layers.push(
        new TileLayer({
          source: new XYZ({ url: config.mapTileUrl, attributions: config.mapTileAttribution || undefined, crossOrigin: 'anonymous' }),
          zIndex: 0,
        }),
      )
    }
    layers.push(
      new Graticule({
        strokeStyle: new Stroke({ color: 'rgba(31, 40, 35, 0.18)', width: 1, lineDash: [2, 4] }),
        showLabels: true,
        wrapX: false,
        zIndex: 1,
      }),
      fieldLayer,
      obstructionLayer,
      previewLayer,
      markerLayer,
    )
    map = new OlMap({
      target,
      layers,
      controls: [
        new Zoom({ zoomInTipLabel: 'Zoom in', zoomOutTipLabel: 'Zoom out' }),
        new ScaleLine({ units: options.units() === 'imperial' ? 'us' : 'metric', bar: false, minWidth: 90 }),
        ...(config.mapTileUrl ? [new Attribution({ collapsible: false })] : []),
      ],
      interactions: defaultInteractions({ doubleClickZoom: false, altShiftDragRotate: false, pinchRotate: false }),
      view: new View({ center: fromLonLat([-93.5, 42.0]), zoom: 5, maxZoom: 21 }),
    })
    map.addInteraction(select)
    map.addInteraction(modify)
    for (const snap of snaps) map.addInteraction(snap)
    keys.push(
      map.on('singleclick', (event) => {
        if (tool.value !== 'sky-check') return
        const [lon, lat] = toLonLat(event.coordinate)
        options.onSkyPoint([lon, lat])
      }),
    )
    setTool('select')
  }

  function destroy(): void {
    unByKey(keys)
    keys.length = 0
    map?.setTarget(undefined)
    map = null
  }

  /** Switches the tool: drawing tools add a Draw interaction; select/sky-check remove it. */
  function setTool(next: MapTool): void {
    tool.value = next
    if (!map) return
    if (draw) {
      map.removeInteraction(draw)
      draw = null
    }
    sketchAreaHa.value = null
    sketchLengthM.value = null
    select.setActive(next === 'select')
    modify.setActive(next === 'select')
    if (next === 'select' || next === 'sky-check') return
    const type = next === 'tree-line' ? 'LineString' : 'Polygon'
    draw = new Draw({ type, stopClick: true })
    draw.on('drawstart', (event) => {
      const geometry = event.feature.getGeometry()
      geometry?.on('change', () => {
        const g = event.feature.getGeometry()
        if (!g) return
        if (g instanceof Polygon) {
          const ring = g.getCoordinates()[0]
          sketchAreaHa.value = ring && ring.length >= 4 ? areaHaOf(toGeoJsonGeometry<GjPolygon>(g)) : 0
        } else if (g instanceof LineString) {
          sketchLengthM.value = turf.length(turf.lineString(toGeoJsonGeometry<GjLineString>(g).coordinates), { units: 'meters' })
        }
      })
    })
    draw.on('drawend', (event) => {
      sketchAreaHa.value = null
      sketchLengthM.value = null
      handleDrawn(event.feature as MapFeature, next)
    })
    map.addInteraction(draw)
    // Snap must come after the interactions it serves.
    for (const snap of snaps) {
      map.removeInteraction(snap)
      map.addInteraction(snap)
    }
  }

  function handleDrawn(drawn: MapFeature, drawnWith: MapTool): void {
    const geometry = drawn.getGeometry()
    if (!geometry) return
    if (drawnWith === 'add-part' || drawnWith === 'cut-hole') {
      const target = selected.value?.get('role') === 'field' ? selected.value : fieldAt(geometry)
      if (!target) {
        options.onHint(drawnWith === 'add-part' ? 'Select a field first, then draw the part to add to it.' : 'Draw the hole inside a field.')
        return
      }
      const ok = drawnWith === 'add-part' ? addPart(target, geometry as Polygon) : cutHole(target, geometry as Polygon)
      if (ok) {
        target.set('dirty', true)
        setSelected(target)
        options.onSelect(target)
        options.onGeometryEdited(target)
      }
      // Back to editing after one part or hole, as after any drawing.
      setTool('select')
      return
    }
    const role = drawnWith === 'draw-field' ? 'field' : 'obstruction'
    drawn.setId(`${role}:new:${++newCounter}`)
    drawn.set('role', role)
    drawn.set('dirty', true)
    if (role === 'field') {
      drawn.set('name', '')
      drawn.set('areaHa', areaHaOf(toGeoJsonGeometry<Boundary>(geometry)))
      fieldSource.addFeature(drawn)
      watchFeature(drawn, 'field')
    } else {
      const kind: ObstructionKind = drawnWith === 'building' ? 'structure' : 'deciduous'
      drawn.setProperties({
        kind,
        heightM: drawnWith === 'building' ? 8 : drawnWith === 'woodlot' ? 18 : 15,
        // Counted all year until the user gives a leafless season (the cautious choice).
        leaflessFrom: null,
        leaflessTo: null,
        note: '',
      })
      obstructionSource.addFeature(drawn)
      watchFeature(drawn, 'obstruction')
      obstructionRevision.value++
    }
    setTool('select')
    setSelected(drawn)
    options.onDrawn(drawn, drawnWith)
  }

  function fieldAt(geometry: Geometry): MapFeature | null {
    const extent = geometry.getExtent()
    const centre = [(extent[0] + extent[2]) / 2, (extent[1] + extent[3]) / 2]
    return fieldSource.getFeaturesAtCoordinate(centre)[0] ?? null
  }

  function addPart(target: MapFeature, part: Polygon): boolean {
    const g = target.getGeometry()
    if (g instanceof Polygon) {
      target.setGeometry(new MultiPolygon([g.getCoordinates(), part.getCoordinates()]))
    } else if (g instanceof MultiPolygon) {
      target.setGeometry(new MultiPolygon([...g.getCoordinates(), part.getCoordinates()]))
    } else return false
    target.set('areaHa', areaHaOf(toGeoJsonGeometry<Boundary>(target.getGeometry()!)), true)
    fieldRevision.value++
    return true
  }

  function cutHole(target: MapFeature, hole: Polygon): boolean {
    const g = target.getGeometry()
    const holeGj = toGeoJsonGeometry<GjPolygon>(hole)
    const ring = hole.getCoordinates()[0]
    if (g instanceof Polygon) {
      const outer = turf.polygon([toGeoJsonGeometry<GjPolygon>(g).coordinates[0]])
      if (!turf.booleanWithin(turf.polygon(holeGj.coordinates), outer)) {
        options.onHint('A hole must lie wholly inside the field.')
        return false
      }
      g.setCoordinates([...g.getCoordinates(), ring])
      return true
    }
    if (g instanceof MultiPolygon) {
      const parts = g.getCoordinates()
      const gj = toGeoJsonGeometry<GjMultiPolygon>(g)
      const i = gj.coordinates.findIndex((p) => turf.booleanWithin(turf.polygon(holeGj.coordinates), turf.polygon([p[0]])))
      if (i < 0) {
        options.onHint('A hole must lie wholly inside one part of the field.')
        return false
      }
      parts[i] = [...parts[i], ring]
      g.setCoordinates(parts)
      return true
    }
    return false
  }

  /** Replaces the fields on the map (keeps unsaved new ones). */
  function setFields(fields: readonly Field[]): void {
    for (const f of fieldSource.getFeatures()) if (!String(f.getId()).includes(':new:')) fieldSource.removeFeature(f)
    for (const field of fields) fieldSource.addFeature(fieldFeature(field))
    fieldRevision.value++
  }

  function fieldFeature(field: Field): MapFeature {
    const feature = new Feature<Geometry>(fromGeoJsonGeometry(field.boundary))
    feature.setId(`field:${field.id}`)
    feature.setProperties({ role: 'field', fieldId: field.id, name: field.name, areaHa: field.areaHa })
    watchFeature(feature, 'field')
    return feature
  }

  /** Replaces the obstructions on the map (keeps unsaved new ones). */
  function setObstructions(obstructions: readonly Obstruction[]): void {
    for (const f of obstructionSource.getFeatures()) if (!String(f.getId()).includes(':new:')) obstructionSource.removeFeature(f)
    for (const o of obstructions) obstructionSource.addFeature(obstructionFeature(o))
    obstructionRevision.value++
  }

  function obstructionFeature(o: Obstruction): MapFeature {
    const feature = new Feature<Geometry>(fromGeoJsonGeometry(o.geometry))
    feature.setId(`obstruction:${o.id}`)
    feature.setProperties({
      role: 'obstruction',
      obstructionId: o.id,
      kind: o.kind,
      heightM: o.heightM,
      leaflessFrom: o.leaflessFrom,
      leaflessTo: o.leaflessTo,
      note: o.note,
    })
    watchFeature(feature, 'obstruction')
    return feature
  }

  /** Puts a saved record's feature in place of the one that was edited or drawn. */
  function replaceFeature(old: MapFeature, record: { field?: Field; obstruction?: Obstruction }): MapFeature {
    const wasSelected = selected.value === old
    let next: MapFeature
    if (record.field) {
      fieldSource.removeFeature(old)
      next = fieldFeature(record.field)
      fieldSource.addFeature(next)
      fieldRevision.value++
    } else {
      obstructionSource.removeFeature(old)
      next = obstructionFeature(record.obstruction!)
      obstructionSource.addFeature(next)
      obstructionRevision.value++
    }
    if (wasSelected) setSelected(next)
    return next
  }

  /** Takes a feature off the map (deleted or an unsaved drawing thrown away). */
  function removeFeature(feature: MapFeature): void {
    if (fieldSource.hasFeature(feature)) fieldSource.removeFeature(feature)
    if (obstructionSource.hasFeature(feature)) obstructionSource.removeFeature(feature)
    if (selected.value === feature) setSelected(null)
    fieldRevision.value++
    obstructionRevision.value++
  }

  /** Every obstruction on the map, as the engine wants them (unsaved edits included). */
  function obstructionCollection(): FeatureCollection {
    return {
      type: 'FeatureCollection',
      features: obstructionSource.getFeatures().flatMap((f) => {
        const g = f.getGeometry()
        if (!g) return []
        const heightM = Number(f.get('heightM'))
        if (!Number.isFinite(heightM)) return []
        return [
          {
            type: 'Feature' as const,
            id: String(f.getId()),
            geometry: toGeoJsonGeometry<ObstructionGeometry>(g),
            properties: {
              heightM,
              kind: f.get('kind') ?? null,
              leaflessFrom: f.get('leaflessFrom') ?? null,
              leaflessTo: f.get('leaflessTo') ?? null,
            },
          },
        ]
      }),
    }
  }

  function fieldFeatureAt(lonLat: [number, number]): MapFeature | null {
    return fieldSource.getFeaturesAtCoordinate(fromLonLat(lonLat))[0] ?? null
  }

  function findField(id: number): MapFeature | null {
    return (fieldSource.getFeatureById(`field:${id}`) as MapFeature | null) ?? null
  }

  function zoomTo(feature: MapFeature): void {
    const g = feature.getGeometry()
    if (!map || !g) return
    map.getView().fit(g.getExtent(), { padding: [60, 60, 60, 60], maxZoom: 18, duration: 250 })
  }

  /** Fits the view to everything drawn; false when there is nothing to fit. */
  function fitAll(): boolean {
    if (!map) return false
    const extent = createEmpty()
    for (const s of [fieldSource, obstructionSource, previewSource]) {
      const e = s.getExtent()
      if (s.getFeatures().length && e) extend(extent, e)
    }
    if (isEmpty(extent)) return false
    map.getView().fit(extent, { padding: [50, 50, 50, 50], maxZoom: 17 })
    return true
  }

  function goTo(lonLat: [number, number], zoom = 16): void {
    map?.getView().animate({ center: fromLonLat(lonLat), zoom, duration: 200 })
  }

  function setPreview(items: { index: number; geometry: unknown; label: string; checked: boolean; problems: string[] }[], fit = false): void {
    previewSource.clear()
    for (const item of items) {
      if (!item.geometry) continue
      const feature = new Feature<Geometry>(fromGeoJsonGeometry(item.geometry))
      feature.setId(`preview:${item.index}`)
      feature.setProperties({ label: item.label, checked: item.checked, problems: item.problems })
      previewSource.addFeature(feature)
    }
    // Show what the file holds: fit the view to it (the upload panel covers the right side).
    const extent = previewSource.getExtent()
    if (fit && map && previewSource.getFeatures().length > 0 && extent && !isEmpty(extent)) {
      map.getView().fit(extent, { padding: [60, 160, 60, 60], maxZoom: 17, duration: 200 })
    }
  }

  /** The sky-check point and any problem spots (e.g. where a boundary crosses itself). */
  function setMarkers(markers: { skyPoint?: [number, number] | null; problems?: { at: [number, number]; label: string }[] }): void {
    if (markers.skyPoint !== undefined) {
      const old = markerSource.getFeatureById('sky-point')
      if (old) markerSource.removeFeature(old)
      if (markers.skyPoint) {
        const f = new Feature<Geometry>(new Point(fromLonLat(markers.skyPoint)))
        f.setId('sky-point')
        f.set('role', 'sky')
        markerSource.addFeature(f)
      }
    }
    if (markers.problems !== undefined) {
      for (const f of markerSource.getFeatures()) if (f.get('role') === 'problem') markerSource.removeFeature(f)
      markers.problems.forEach((p, i) => {
        const f = new Feature<Geometry>(new Point(fromLonLat(p.at)))
        f.setId(`problem:${i}`)
        f.setProperties({ role: 'problem', label: p.label })
        markerSource.addFeature(f)
      })
    }
  }

  /** Redraws labels (after a unit or name change). */
  function refreshStyles(): void {
    fieldLayer.changed()
    obstructionLayer.changed()
  }

  /** Pixel of a WGS-84 position in the map element (for tests and popovers). */
  function pixelOf(lonLat: [number, number]): [number, number] | null {
    const p = map?.getPixelFromCoordinate(fromLonLat(lonLat))
    return p ? [p[0], p[1]] : null
  }

  return {
    tool,
    selected,
    sketchAreaHa,
    sketchLengthM,
    obstructionRevision,
    fieldRevision,
    mount,
    destroy,
    setTool,
    setSelected,
    setFields,
    setObstructions,
    replaceFeature,
    removeFeature,
    obstructionCollection,
    fieldFeatureAt,
    findField,
    zoomTo,
    fitAll,
    goTo,
    setPreview,
    setMarkers,
    refreshStyles,
    pixelOf,
    getMap: () => map,
  }
}

export type FarmMap = ReturnType<typeof useFarmMap>
