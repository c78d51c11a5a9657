/**
 * The Fields page's OpenLayers map: the view, the layers for fields, obstructions, an
 * upload preview and markers, and the records shown on them. The drawing and editing
 * tools are useMapTools'; the pure geometry is in lib/farmGeometry, the conversions to
 * the API's WGS-84 GeoJSON in components/map/geojson.
 *
 * Offline by default: a plain background, a graticule, a scale line and a north arrow
 * (in the page's template). An imagery tile URL from config is drawn underneath when set.
 */
import { ref } from 'vue'
import OlMap from 'ol/Map'
import View from 'ol/View'
import Feature from 'ol/Feature'
import VectorLayer from 'ol/layer/Vector'
import TileLayer from 'ol/layer/Tile'
import Graticule from 'ol/layer/Graticule'
import VectorSource from 'ol/source/Vector'
import XYZ from 'ol/source/XYZ'
import ScaleLine from 'ol/control/ScaleLine'
import Zoom from 'ol/control/Zoom'
import Attribution from 'ol/control/Attribution'
import { defaults as defaultInteractions } from 'ol/interaction'
import { Point, type Geometry } from 'ol/geom'
import { Stroke } from 'ol/style'
import { fromLonLat, toLonLat } from 'ol/proj'
import { createEmpty, extend, isEmpty } from 'ol/extent'
import { unByKey } from 'ol/Observable'
import type { EventsKey } from 'ol/events'
import type { FeatureCollection } from 'geojson'
import type { UnitSystem } from '@shared/schemas'
import type { Field, Obstruction } from '@shared/schemas/fields'
import type { Boundary, ObstructionGeometry } from '@shared/schemas/geo'
import { config } from '@/config'
import { fieldStyle, markerStyle, obstructionStyle, previewStyle } from '@/components/map/styles'
import { fromGeoJsonGeometry, toGeoJsonGeometry } from '@/components/map/geojson'
import { areaHaOf } from '@/lib/farmGeometry'
import { useMapTools, type MapFeature, type MapTool } from './useMapTools'

export type { MapFeature, MapTool } from './useMapTools'

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
  /** Bumped whenever an obstruction changes (geometry or height): the sky check listens. */
  const obstructionRevision = ref(0)
  /** Bumped whenever a field changes. */
  const fieldRevision = ref(0)

  const fieldSource = new VectorSource<MapFeature>()
  const obstructionSource = new VectorSource<MapFeature>()
  const previewSource = new VectorSource<MapFeature>()
  const markerSource = new VectorSource<MapFeature>()

  const selectedId = () => tools.selected.value?.getId()
  const fieldLayer = new VectorLayer({ source: fieldSource, style: fieldStyle(options.units, selectedId), zIndex: 10, declutter: 'labels' })
  const obstructionLayer = new VectorLayer({ source: obstructionSource, style: obstructionStyle(options.units, selectedId), zIndex: 20, declutter: 'labels' })
  const previewLayer = new VectorLayer({ source: previewSource, style: previewStyle, zIndex: 30 })
  const markerLayer = new VectorLayer({ source: markerSource, style: markerStyle, zIndex: 40 })

  let map: OlMap | null = null
  const keys: EventsKey[] = []

  const tools = useMapTools({
    fieldSource,
    obstructionSource,
    fieldLayer,
    obstructionLayer,
    addDrawn(feature, role) {
      if (role === 'field') {
        fieldSource.addFeature(feature)
        watchFeature(feature, 'field')
      } else {
        obstructionSource.addFeature(feature)
        watchFeature(feature, 'obstruction')
        obstructionRevision.value++
      }
    },
    onPartsChanged(feature) {
      feature.set('areaHa', areaHaOf(toGeoJsonGeometry<Boundary>(feature.getGeometry()!)), true)
      fieldRevision.value++
    },
    onSelect: options.onSelect,
    onDrawn: options.onDrawn,
    onGeometryEdited: options.onGeometryEdited,
    onHint: options.onHint,
  })
  const { selected, setSelected } = tools

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
    keys.push(
      map.on('singleclick', (event) => {
        if (tools.tool.value !== 'sky-check') return
        const [lon, lat] = toLonLat(event.coordinate)
        options.onSkyPoint([lon, lat])
      }),
    )
    tools.attach(map)
  }

  function destroy(): void {
    unByKey(keys)
    keys.length = 0
    map?.setTarget(undefined)
    map = null
    tools.detach()
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

  /** Moves the view to a place at once (an animation could be cut short by a view change meanwhile). */
  function goTo(lonLat: [number, number], zoom = 16): void {
    const view = map?.getView()
    view?.setCenter(fromLonLat(lonLat))
    view?.setZoom(zoom)
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
    tool: tools.tool,
    selected,
    sketchAreaHa: tools.sketchAreaHa,
    sketchLengthM: tools.sketchLengthM,
    obstructionRevision,
    fieldRevision,
    mount,
    destroy,
    setTool: tools.setTool,
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
