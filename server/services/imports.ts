// Boundary uploads: step one previews the polygon features of a file (geometry, attributes,
// area, problems); step two turns the chosen features into fields in ONE transaction (all
// or nothing). The server keeps nothing between the steps: the client sends the file again.
import type { Feature, Geometry, MultiPolygon, Polygon } from 'geojson'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { boundarySchema, type Boundary } from '../../shared/schemas/geo.ts'
import type { Field, FieldImportOptions, FieldImportResult, ImportFeature, ImportPreview } from '../../shared/schemas/fields.ts'
import { assertFarmVisible } from '../auth/access.ts'
import { UniqueViolation } from '../db/repositories/index.ts'
import { emit } from '../events.ts'
import { HttpError, badRequest, conflict, notFound } from '../http/errors.ts'
import { boundaryProblems, measureBoundary } from '../imports/geometry.ts'
import { readBoundaryFile } from '../imports/readers.ts'
import type { ServiceContext } from './context.ts'
import { assertServiceLevel, nameTakenMessage, toField, unusualAreaMessage } from './fields.ts'

/** Most polygon features one upload may hold. */
export const MAX_IMPORT_FEATURES = 2000

const NAME_KEYS = /^(name|field_?name|fieldname|field|feld|title|label|farm_?field|fld_?name)$/i

type PropertyValue = string | number | boolean | null

function flatProperties(p: unknown): Record<string, PropertyValue> {
  const out: Record<string, PropertyValue> = {}
  if (!p || typeof p !== 'object') return out
  for (const [k, v] of Object.entries(p as Record<string, unknown>)) {
    if (v === null || v === undefined) out[k] = null
    else if (typeof v === 'string' || typeof v === 'number' || typeof v === 'boolean') out[k] = v
    else if (v instanceof Date) out[k] = v.toISOString().slice(0, 10)
    else out[k] = JSON.stringify(v).slice(0, 500)
  }
  return out
}

/** Polygon geometry of a feature (GeometryCollections of polygons merged), or null. */
function polygonOf(g: Geometry | null | undefined): Polygon | MultiPolygon | null {
  if (!g) return null
  if (g.type === 'Polygon' || g.type === 'MultiPolygon') return g
  if (g.type === 'GeometryCollection') {
    const parts: Polygon['coordinates'][] = []
    for (const x of g.geometries) {
      const p = polygonOf(x)
      if (p?.type === 'Polygon') parts.push(p.coordinates)
      else if (p?.type === 'MultiPolygon') parts.push(...p.coordinates)
    }
    if (parts.length === 0) return null
    return parts.length === 1 ? { type: 'Polygon', coordinates: parts[0] } : { type: 'MultiPolygon', coordinates: parts }
  }
  return null
}

const stringValue = (v: PropertyValue | undefined) => (v === null || v === undefined ? '' : String(v).trim())

export async function previewBoundaryFile(buffer: Buffer, fileName: string): Promise<ImportPreview> {
  const file = await readBoundaryFile(buffer)
  const features: ImportFeature[] = []
  const ignored: Record<string, number> = {}
  const attributes: string[] = []
  const seenAttributes = new Set<string>()
  for (const raw of file.collection.features as (Feature<Geometry | null> | null)[]) {
    const poly = polygonOf(raw?.geometry)
    if (!poly) {
      const type = raw?.geometry?.type ?? 'no geometry'
      ignored[type] = (ignored[type] ?? 0) + 1
      continue
    }
    if (features.length >= MAX_IMPORT_FEATURES) {
      throw badRequest(`The file holds more than ${MAX_IMPORT_FEATURES.toLocaleString('en-US')} polygons; split it into smaller files.`)
    }
    const properties = flatProperties(raw?.properties)
    for (const k of Object.keys(properties)) {
      if (!seenAttributes.has(k)) {
        seenAttributes.add(k)
        attributes.push(k)
      }
    }
    const problems: string[] = []
    let geometry: Boundary | null = null
    const parsed = boundarySchema.safeParse(poly)
    if (parsed.success) geometry = parsed.data
    else problems.push(`the geometry is not a valid polygon (${parsed.error.issues[0]?.message ?? 'unexpected shape'})`)
    let areaHa: number | null = null
    let areaAc: number | null = null
    let unusualArea = false
    if (geometry) {
      problems.push(...boundaryProblems(geometry))
      if (problems.length === 0) {
        const m = measureBoundary(geometry)
        geometry = m.boundary
        areaHa = Math.round(m.areaHa * 1e4) / 1e4
        areaAc = Math.round(m.areaAc * 1e4) / 1e4
        unusualArea = unusualAreaMessage(m.areaHa) !== null
      }
    }
    const nameKey = Object.keys(properties).find((k) => NAME_KEYS.test(k) && stringValue(properties[k]) !== '')
    features.push({
      index: features.length,
      // A feature too broken to parse is shown with its raw rings so the user can see it.
      geometry: geometry ?? (poly as unknown as Boundary),
      properties,
      areaHa,
      areaAc,
      problems,
      unusualArea,
      suggestedName: nameKey ? stringValue(properties[nameKey]).slice(0, 120) : '',
    })
  }
  if (features.length === 0) {
    const found = Object.entries(ignored)
      .map(([type, n]) => `${n} ${type}`)
      .join(', ')
    const msg = found ? `The file holds no polygons (it holds ${found}). Fields need polygon boundaries.` : 'The file holds no features.'
    throw badRequest(msg, { file: msg })
  }
  return { format: file.format, fileName, sourceCrs: file.sourceCrs, features, attributes, ignored }
}

export function createImportsService(ctx: ServiceContext) {
  const { store } = ctx

  async function assertFarm(user: SessionUser, farmId: number): Promise<void> {
    assertFarmVisible(user, farmId)
    if (!(await store.repos.farms.findById(farmId))) throw notFound('The farm')
  }

  function requireFile(file: { buffer: Buffer; originalname: string } | undefined): { buffer: Buffer; originalname: string } {
    if (!file) throw badRequest('Choose a boundary file to upload.', { file: 'Choose a boundary file to upload.' })
    return file
  }

  return {
    async preview(user: SessionUser, farmId: number, file: { buffer: Buffer; originalname: string } | undefined): Promise<ImportPreview> {
      await assertFarm(user, farmId)
      const f = requireFile(file)
      return previewBoundaryFile(f.buffer, f.originalname)
    },

    async importFields(
      user: SessionUser,
      farmId: number,
      file: { buffer: Buffer; originalname: string } | undefined,
      options: FieldImportOptions,
    ): Promise<FieldImportResult> {
      await assertFarm(user, farmId)
      const f = requireFile(file)
      const preview = await previewBoundaryFile(f.buffer, f.originalname)
      const fields: Record<string, string> = {}
      const chosen: { feature: ImportFeature; name: string; key: string }[] = []
      options.selections.forEach((s, k) => {
        const key = `selections.${k}`
        const feature = preview.features[s.index]
        if (!feature) {
          fields[`${key}.index`] = `The file has no polygon feature ${s.index} (it has ${preview.features.length}, numbered from 0).`
          return
        }
        const name = (s.name || (options.nameAttribute ? stringValue(feature.properties[options.nameAttribute]) : '')).slice(0, 120).trim()
        if (!name) {
          fields[`${key}.name`] = options.nameAttribute
            ? `Feature ${s.index} has no value for "${options.nameAttribute}": enter a name.`
            : `Enter a name for feature ${s.index}.`
          return
        }
        if (feature.problems.length) {
          fields[key] = `Feature ${s.index} (${name}) cannot become a field: ${feature.problems[0]}.`
          return
        }
        chosen.push({ feature, name, key })
      })
      let keys = Object.keys(fields)
      if (keys.length) throw badRequest(fields[keys[0]], fields)

      const unusual = chosen.filter((c) => c.feature.unusualArea)
      if (unusual.length && !options.confirmUnusualArea) {
        for (const c of unusual) fields[c.key] = `${c.name}: ${unusualAreaMessage(c.feature.areaHa!)}`
        const first = unusual[0]
        throw new HttpError(422, 'confirm-area', `${first.name}: ${unusualAreaMessage(first.feature.areaHa!)}`, {
          confirmUnusualArea: unusual.map((c) => c.name).join(', '),
          ...fields,
        })
      }

      const seen = new Map<string, string>()
      for (const c of chosen) {
        const lower = c.name.toLowerCase()
        if (seen.has(lower)) fields[c.key + '.name'] = `The name "${c.name}" is chosen twice.`
        seen.set(lower, c.key)
      }
      keys = Object.keys(fields)
      if (keys.length) throw conflict(fields[keys[0]], fields)

      let created: Field[]
      try {
        created = await store.transaction(async (repos) => {
          await assertServiceLevel(repos, options.serviceLevelId)
          const taken = await repos.fields.namesOfFarm(farmId)
          for (const c of chosen) if (taken.has(c.name.toLowerCase())) fields[c.key + '.name'] = nameTakenMessage(c.name)
          const k = Object.keys(fields)
          if (k.length) throw conflict(k.length === 1 ? fields[k[0]] : `${k.length} of the chosen names are already used on this farm.`, fields)
          const out: Field[] = []
          for (const c of chosen) {
            const m = measureBoundary(c.feature.geometry)
            const id = await repos.fields.insert({
              farmId,
              name: c.name,
              crop: options.crop,
              notes: `Imported from ${preview.fileName || 'an uploaded file'} (feature ${c.feature.index}).`.slice(0, 4000),
              serviceLevelId: options.serviceLevelId,
              antennaHeightM: options.antennaHeightM,
              boundary: JSON.stringify(m.boundary),
              areaHa: m.areaHa,
              centroidLat: m.centroid.latDeg,
              centroidLon: m.centroid.lonDeg,
            })
            out.push(toField((await repos.fields.findById(id))!))
          }
          return out
        })
      } catch (error) {
        if (error instanceof UniqueViolation) throw conflict('One of the chosen names was just used on this farm by someone else; choose again.')
        throw error
      }
      for (const field of created) void emit('field.changed', { fieldId: field.id, farmId, deleted: false })
      return { created }
    },
  }
}
export type ImportsService = ReturnType<typeof createImportsService>
