/**
 * How the Fields map draws things. Fields are filled in the brand's field green with
 * their name and area; obstructions in browns and greys by kind, tree lines as thick
 * lines, all labelled with their height; the selection is outlined in dark blue.
 */
import type { FeatureLike } from 'ol/Feature'
import { Circle as CircleStyle, Fill, RegularShape, Stroke, Style, Text } from 'ol/style'
import type { UnitSystem } from '@shared/schemas'
import type { ObstructionKind } from '@shared/precision'
import { formatAreaBoth, formatHeight } from '@/lib/units'

export const obstructionColours: Record<ObstructionKind, { stroke: string; fill: string; label: string }> = {
  deciduous: { stroke: '#7a5b1e', fill: 'rgba(122, 91, 30, 0.35)', label: 'Deciduous trees' },
  evergreen: { stroke: '#2f3b1c', fill: 'rgba(47, 59, 28, 0.40)', label: 'Evergreen trees' },
  structure: { stroke: '#4a4a52', fill: 'rgba(74, 74, 82, 0.40)', label: 'Building or structure' },
}

const selectedStroke = '#1f3a6e'

/** The larger side of a feature's extent in screen pixels. */
function widthPx(feature: FeatureLike, resolution: number): number {
  const e = feature.getGeometry()?.getExtent()
  if (!e) return 0
  return Math.max(e[2] - e[0], e[3] - e[1]) / resolution
}

function labelText(text: string, offsetY = 0): Text {
  return new Text({
    text,
    font: '600 12px "Open Sans", system-ui, sans-serif',
    fill: new Fill({ color: '#1f2823' }),
    stroke: new Stroke({ color: 'rgba(255,255,255,0.95)', width: 3.5 }),
    overflow: true,
    offsetY,
  })
}

/** Style of a field feature (properties: name, areaHa, dirty). */
export function fieldStyle(units: () => UnitSystem, selectedId: () => string | number | undefined) {
  return (feature: FeatureLike, resolution: number): Style[] => {
    const selected = feature.getId() !== undefined && feature.getId() === selectedId()
    const name = (feature.get('name') as string | undefined) || 'New field'
    // Labels only where the field is wide enough on screen to carry them.
    const showLabel = selected || widthPx(feature, resolution) >= 70
    const areaHa = feature.get('areaHa') as number | undefined
    const text = areaHa !== undefined ? `${name}\n${formatAreaBoth(areaHa, units())}` : name
    return [
      new Style({
        fill: new Fill({ color: selected ? 'rgba(231, 215, 169, 0.55)' : 'rgba(43, 93, 74, 0.20)' }),
        stroke: new Stroke({ color: selected ? selectedStroke : '#2b5d4a', width: selected ? 3 : 2, lineDash: feature.get('dirty') ? [8, 5] : undefined }),
        text: showLabel ? labelText(text) : undefined,
        zIndex: selected ? 2 : 1,
      }),
    ]
  }
}

/** Style of an obstruction feature (properties: kind, heightM). */
export function obstructionStyle(units: () => UnitSystem, selectedId: () => string | number | undefined) {
  return (feature: FeatureLike, resolution: number): Style[] => {
    const kind = (feature.get('kind') as ObstructionKind | undefined) ?? 'deciduous'
    const colours = obstructionColours[kind] ?? obstructionColours.deciduous
    const selected = feature.getId() !== undefined && feature.getId() === selectedId()
    const isLine = feature.getGeometry()?.getType() === 'LineString'
    const heightM = Number(feature.get('heightM'))
    const text = Number.isFinite(heightM) && (selected || widthPx(feature, resolution) >= 24) ? formatHeight(heightM, units()) : ''
    const styles: Style[] = []
    if (selected) {
      styles.push(new Style({ stroke: new Stroke({ color: selectedStroke, width: isLine ? 12 : 5 }), zIndex: 3 }))
    }
    styles.push(
      new Style({
        stroke: new Stroke({
          color: colours.stroke,
          width: isLine ? 7 : 2,
          lineCap: 'round',
          lineDash: kind === 'deciduous' && isLine ? [1, 10] : undefined,
        }),
        fill: isLine ? undefined : new Fill({ color: colours.fill }),
        text: labelText(text, isLine ? -14 : 0),
        zIndex: selected ? 4 : 2,
      }),
    )
    if (isLine && kind === 'deciduous') {
      // Round crowns along the line: a dotted thick stroke over a thinner solid one.
      styles.push(new Style({ stroke: new Stroke({ color: colours.stroke, width: 3 }), zIndex: selected ? 4 : 2 }))
    }
    return styles
  }
}

/** Features of an upload preview: checked ones in dark blue, others faint. */
export function previewStyle(feature: FeatureLike): Style {
  const checked = feature.get('checked') !== false
  const bad = (feature.get('problems') as string[] | undefined)?.length
  return new Style({
    fill: new Fill({ color: checked ? 'rgba(31, 58, 110, 0.18)' : 'rgba(120, 120, 120, 0.08)' }),
    stroke: new Stroke({ color: bad ? '#74281f' : checked ? '#1f3a6e' : '#8a8a8a', width: 2, lineDash: checked ? undefined : [4, 4] }),
    text: labelText(String(feature.get('label') ?? '')),
  })
}

/** The sky-check point (a ring with a cross) and problem spots (a brown-red X with a label). */
export function markerStyle(feature: FeatureLike): Style {
  if (feature.get('role') === 'problem') {
    return new Style({
      image: new RegularShape({
        points: 4,
        radius: 11,
        radius2: 0,
        angle: Math.PI / 4,
        stroke: new Stroke({ color: '#74281f', width: 4 }),
      }),
      text: labelText(String(feature.get('label') ?? ''), -20),
      zIndex: 10,
    })
  }
  return new Style({
    image: new CircleStyle({
      radius: 9,
      fill: new Fill({ color: 'rgba(255,255,255,0.6)' }),
      stroke: new Stroke({ color: '#1f3a6e', width: 3 }),
    }),
    text: labelText('Sky check', -20),
    zIndex: 10,
  })
}
