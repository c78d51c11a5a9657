// Elevation models (terrain): one per farm, stored once and reused by every field of the
// farm it covers. The heights are kept in their own CRS (Float32, deflated, in chunks of
// at most 4 MiB raw so that no row passes MariaDB's default packet size).
import { customType, datetime, double, index, int, mysqlTable, primaryKey, text, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { farms, users } from './schema.ts'

const now = () => new Date()

/** MEDIUMBLOB holding raw bytes (up to 16 MiB). */
const mediumblob = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => 'mediumblob',
})

export const elevationModels = mysqlTable(
  'elevation_models',
  {
    id: int('id').autoincrement().primaryKey(),
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    fileName: varchar('file_name', { length: 255 }).notNull(),
    format: varchar('format', { length: 16 }).notNull(),
    /** proj4 definition or WKT */
    crs: text('crs').notNull(),
    crsLabel: varchar('crs_label', { length: 255 }).notNull(),
    cols: int('cols').notNull(),
    rows: int('rows').notNull(),
    x0: double('x0').notNull(),
    y0: double('y0').notNull(),
    dx: double('dx').notNull(),
    dy: double('dy').notNull(),
    minLonDeg: double('min_lon_deg').notNull(),
    minLatDeg: double('min_lat_deg').notNull(),
    maxLonDeg: double('max_lon_deg').notNull(),
    maxLatDeg: double('max_lat_deg').notNull(),
    minHeightM: double('min_height_m'),
    maxHeightM: double('max_height_m'),
    /** share of cells without data (0..1) */
    nodataShare: double('nodata_share').notNull(),
    /** SHA-256 of the heights and georeferencing: part of the forecast inputs version */
    contentSha: varchar('content_sha', { length: 64 }).notNull(),
    uploadedBy: int('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().$defaultFn(now),
  },
  (t) => [uniqueIndex('elevation_models_farm_unique').on(t.farmId)],
)

export const elevationModelChunks = mysqlTable(
  'elevation_model_chunks',
  {
    modelId: int('model_id')
      .notNull()
      .references(() => elevationModels.id, { onDelete: 'cascade' }),
    seq: int('seq').notNull(),
    data: mediumblob('data').notNull(),
  },
  (t) => [primaryKey({ columns: [t.modelId, t.seq] }), index('elevation_model_chunks_model_idx').on(t.modelId)],
)

export type ElevationModelRow = typeof elevationModels.$inferSelect
export type NewElevationModel = typeof elevationModels.$inferInsert
