/**
 * The Fields map's drawing and editing tools: picking a field or obstruction, moving
 * vertices with snapping, drawing new fields and obstructions, adding a part to a field
 * and cutting a hole in it. The map itself (layers, view, records) is useFarmMap's.
 */
import { ref, shallowRef, type Ref } from 'vue'
import type OlMap from 'ol/Map'
import type VectorLayer from 'ol/layer/Vector'
import type VectorSource from 'ol/source/Vector'
import type Feature from 'ol/Feature'
import { Draw, Modify, Select, Snap } from 'ol/interaction'
import { MultiPolygon, Polygon, LineString, type Geometry } from 'ol/geom'
import { click } from 'ol/events/condition'
import type { LineString as GjLineString, Polygon as GjPolygon, MultiPolygon as GjMultiPolygon } from 'geojson'
import type { ObstructionKind } from '@shared/precision'
import { areaHaOf, lineLengthM, partHoldingHole } from '@/lib/farmGeometry'
import { toGeoJsonGeometry } from '@/components/map/geojson'

export type MapTool = 'select' | 'draw-field' | 'add-part' | 'cut-hole' | 'tree-line' | 'woodlot' | 'building' | 'sky-check'

export type MapFeature = Feature<Geometry>

export interface MapToolsContext {
  fieldSource: VectorSource<MapFeature>
  obstructionSource: VectorSource<MapFeature>
  fieldLayer: VectorLayer
  obstructionLayer: VectorLayer
  /** A newly drawn field or obstruction, id and properties set: the map adds and watches it. */
  addDrawn: (feature: MapFeature, role: 'field' | 'obstruction') => void
  /** A field got a part or a hole. */
  onPartsChanged: (feature: MapFeature) => void
  onSelect: (feature: MapFeature | null) => void
  onDrawn: (feature: MapFeature, tool: MapTool) => void
  onGeometryEdited: (feature: MapFeature) => void
  onHint: (text: string) => void
}

export function useMapTools(ctx: MapToolsContext) {
  const tool: Ref<MapTool> = ref('select')
  const selected = shallowRef<MapFeature | null>(null)
  /** Area (ha) of the boundary being drawn, while it is drawn. */
  const sketchAreaHa = ref<number | null>(null)
  /** Length (m) of the tree line being drawn. */
  const sketchLengthM = ref<number | null>(null)

  let map: OlMap | null = null
  let draw: Draw | null = null
  let newCounter = 0

  const select = new Select({
    layers: [ctx.fieldLayer, ctx.obstructionLayer],
    condition: click,
    hitTolerance: 6,
    // The layers' own styles show the selection, so the Select overlay draws nothing.
    style: null,
  })
  const modify = new Modify({ features: select.getFeatures(), pixelTolerance: 10 })
  const snaps = [new Snap({ source: ctx.fieldSource, pixelTolerance: 10 }), new Snap({ source: ctx.obstructionSource, pixelTolerance: 10 })]

  select.on('select', () => {
    const picked = select.getFeatures().item(0) ?? null
    setSelected(picked)
    ctx.onSelect(picked)
  })
  modify.on('modifyend', (event) => {
    const feature = event.features.item(0) as MapFeature | undefined
    if (feature) {
      feature.set('dirty', true)
      ctx.onGeometryEdited(feature)
    }
  })

  /** Puts the tools on a map, starting with select. */
  function attach(target: OlMap): void {
    map = target
    map.addInteraction(select)
    map.addInteraction(modify)
    for (const snap of snaps) map.addInteraction(snap)
    setTool('select')
  }

  function detach(): void {
    map = null
    draw = null
  }

  function setSelected(feature: MapFeature | null): void {
    selected.value = feature
    const features = select.getFeatures()
    if (feature === null) features.clear()
    else if (features.item(0) !== feature) {
      features.clear()
      features.push(feature)
    }
    ctx.fieldLayer.changed()
    ctx.obstructionLayer.changed()
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
          sketchLengthM.value = lineLengthM(toGeoJsonGeometry<GjLineString>(g))
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
        ctx.onHint(drawnWith === 'add-part' ? 'Select a field first, then draw the part to add to it.' : 'Draw the hole inside a field.')
        return
      }
      const ok = drawnWith === 'add-part' ? addPart(target, geometry as Polygon) : cutHole(target, geometry as Polygon)
      if (ok) {
        target.set('dirty', true)
        setSelected(target)
        ctx.onSelect(target)
        ctx.onGeometryEdited(target)
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
      drawn.set('areaHa', areaHaOf(toGeoJsonGeometry<GjPolygon>(geometry)))
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
    }
    ctx.addDrawn(drawn, role)
    setTool('select')
    setSelected(drawn)
    ctx.onDrawn(drawn, drawnWith)
  }

  function fieldAt(geometry: Geometry): MapFeature | null {
    const extent = geometry.getExtent()
    const centre = [(extent[0] + extent[2]) / 2, (extent[1] + extent[3]) / 2]
    return ctx.fieldSource.getFeaturesAtCoordinate(centre)[0] ?? null
  }

  function addPart(target: MapFeature, part: Polygon): boolean {
    const g = target.getGeometry()
    if (g instanceof Polygon) {
      target.setGeometry(new MultiPolygon([g.getCoordinates(), part.getCoordinates()]))
    } else if (g instanceof MultiPolygon) {
      target.setGeometry(new MultiPolygon([...g.getCoordinates(), part.getCoordinates()]))
    } else return false
    ctx.onPartsChanged(target)
    return true
  }

  function cutHole(target: MapFeature, hole: Polygon): boolean {
    const g = target.getGeometry()
    if (!(g instanceof Polygon) && !(g instanceof MultiPolygon)) return false
    const i = partHoldingHole(toGeoJsonGeometry<GjPolygon | GjMultiPolygon>(g), toGeoJsonGeometry<GjPolygon>(hole))
    if (i < 0) {
      ctx.onHint(g instanceof Polygon ? 'A hole must lie wholly inside the field.' : 'A hole must lie wholly inside one part of the field.')
      return false
    }
    const ring = hole.getCoordinates()[0]
    if (g instanceof Polygon) {
      g.setCoordinates([...g.getCoordinates(), ring])
    } else {
      const parts = g.getCoordinates()
      parts[i] = [...parts[i], ring]
      g.setCoordinates(parts)
    }
    return true
  }

  return { tool, selected, sketchAreaHa, sketchLengthM, attach, detach, setTool, setSelected }
}
