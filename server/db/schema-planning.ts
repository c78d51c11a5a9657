// The planning side of the database schema: correction service levels, work types,
// machines, fields and obstructions, orbit data and outages, forecast jobs and the stored
// hourly forecasts, passes, calendar feeds and weekly plan e-mails.
// Migrations in drizzle/ are generated from this file and schema.ts (`npm run db:generate`).
//
// Times are DATETIME(3) in UTC, as in schema.ts. Geometry is stored as GeoJSON text
// (WGS-84 longitude/latitude), validated by the shared zod schemas before it is written.
import {
  bigint,
  boolean,
  date,
  datetime,
  double,
  index,
  int,
  mediumtext,
  mysqlTable,
  primaryKey,
  smallint,
  text,
  uniqueIndex,
  varchar,
  type MySqlDoubleBuilderInitial,
} from 'drizzle-orm/mysql-core'
import type { HasDefault, NotNull } from 'drizzle-orm'
import { ZodNullable } from 'zod'
import { hourFiguresSchema, type HourFigures } from '../../shared/schemas/forecast.ts'
import { farms, users } from './schema.ts'

const now = () => new Date()
const at = (name: string) => datetime(name, { mode: 'date', fsp: 3 })
const createdAt = () => at('created_at').notNull().$defaultFn(now)
const updatedAt = () => at('updated_at').notNull().$defaultFn(now).$onUpdateFn(now)

/** Correction service levels (standalone, SBAS, RTK, ...) with their ranging error sigma. */
export const serviceLevels = mysqlTable(
  'service_levels',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 80 }).notNull(),
    /** sigma of the user equivalent range error, metres. */
    sigmaUereM: double('sigma_uere_m').notNull(),
    /** Error model with a baseline (shared/precision/errorModel.ts): mm per km of baseline, horizontal and vertical. */
    ppmH: double('ppm_h').notNull().default(0),
    ppmV: double('ppm_v').notNull().default(0),
    /** Longest usable baseline (km); null: no limit. */
    maxBaselineKm: double('max_baseline_km'),
    /** The service needs a base station or network (RTK): fields out of reach are Closed for it. */
    needsBase: boolean('needs_base').notNull().default(false),
    note: varchar('note', { length: 500 }).notNull().default(''),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('service_levels_name_unique').on(t.name)],
)

/** Kinds of precision work with the thresholds an hour must meet. */
export const workTypes = mysqlTable(
  'work_types',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 80 }).notNull(),
    serviceLevelId: int('service_level_id')
      .notNull()
      .references(() => serviceLevels.id),
    maxH95M: double('max_h95_m').notNull(),
    /** null: vertical error does not matter for this work. */
    maxV95M: double('max_v95_m'),
    minSats: smallint('min_sats').notNull(),
    maxPdop: double('max_pdop').notNull(),
    /** Share of the field's area (0..1) that must meet the thresholds. */
    requiredShare: double('required_share').notNull(),
    requireN1: boolean('require_n1').notNull(),
    rateHaPerH: double('rate_ha_per_h').notNull(),
    /** What an hour of a G3-or-worse geomagnetic storm does to this work: none, tight or closed. */
    stormAction: varchar('storm_action', { length: 8, enum: ['none', 'tight', 'closed'] }).notNull().default('none'),
    sortOrder: smallint('sort_order').notNull().default(0),
    active: boolean('active').notNull().default(true),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('work_types_name_unique').on(t.name)],
)

/** Tractors and other machines (and their crews) that passes are booked on. */
export const machines = mysqlTable(
  'machines',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 120 }).notNull(),
    crew: varchar('crew', { length: 120 }).notNull().default(''),
    antennaHeightM: double('antenna_height_m').notNull(),
    /** Overrides the work type's rate when set. */
    rateHaPerH: double('rate_ha_per_h'),
    active: boolean('active').notNull().default(true),
    notes: varchar('notes', { length: 1000 }).notNull().default(''),
    /** The signed-in user who runs this machine: its passes show in that user's cab view. */
    operatorUserId: int('operator_user_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('machines_name_unique').on(t.name)],
)

/** The contractor's own RTK base stations. */
export const baseStations = mysqlTable(
  'base_stations',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 120 }).notNull(),
    latDeg: double('lat_deg').notNull(),
    lonDeg: double('lon_deg').notNull(),
    antennaHeightM: double('antenna_height_m').notNull().default(0),
    radioRangeKm: double('radio_range_km').notNull(),
    note: varchar('note', { length: 1000 }).notNull().default(''),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('base_stations_name_unique').on(t.name)],
)

/** Correction networks: a coverage polygon and/or mount points (JSON). */
export const correctionNetworks = mysqlTable(
  'correction_networks',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 120 }).notNull(),
    /** GeoJSON Polygon (one ring) or null. */
    coverage: mediumtext('coverage'),
    /** JSON array of { name, latDeg, lonDeg }. */
    mountPointsJson: text('mount_points_json').notNull(),
    note: varchar('note', { length: 1000 }).notNull().default(''),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('correction_networks_name_unique').on(t.name)],
)

/** Planetary K index blocks of the space-weather feed (3 hours each, UTC). */
export const kpBlocks = mysqlTable('kp_blocks', {
  blockStart: at('block_start').primaryKey(),
  blockEnd: at('block_end').notNull(),
  kp: double('kp').notNull(),
  observed: boolean('observed').notNull().default(false),
  fetchedAt: at('fetched_at').notNull().$defaultFn(now),
})

/** The space-weather feed's last fetch (a single row, id 1). */
export const spaceWeatherFeed = mysqlTable('space_weather_feed', {
  id: int('id').primaryKey(),
  url: varchar('url', { length: 1000 }).notNull().default(''),
  lastAttemptAt: at('last_attempt_at'),
  lastOkAt: at('last_ok_at'),
  lastError: varchar('last_error', { length: 1000 }),
})

export const fields = mysqlTable(
  'fields',
  {
    id: int('id').autoincrement().primaryKey(),
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 120 }).notNull(),
    crop: varchar('crop', { length: 80 }).notNull().default(''),
    notes: text('notes').notNull(),
    serviceLevelId: int('service_level_id')
      .notNull()
      .references(() => serviceLevels.id),
    antennaHeightM: double('antenna_height_m').notNull(),
    /** The field's chosen RTK base or correction network; both null: the nearest reachable one. */
    baseStationId: int('base_station_id').references(() => baseStations.id, { onDelete: 'set null' }),
    networkId: int('network_id').references(() => correctionNetworks.id, { onDelete: 'set null' }),
    /** GeoJSON Polygon or MultiPolygon geometry (lon/lat, WGS-84). */
    boundary: mediumtext('boundary').notNull(),
    areaHa: double('area_ha').notNull(),
    centroidLat: double('centroid_lat').notNull(),
    centroidLon: double('centroid_lon').notNull(),
    /** Bumped on every change of the field's own inputs. */
    revision: int('revision').notNull().default(1),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('fields_farm_name_unique').on(t.farmId, t.name), index('fields_farm_idx').on(t.farmId)],
)

/** Tree lines (LineString), woodlots and buildings (Polygon); they belong to the farm. */
export const obstructions = mysqlTable(
  'obstructions',
  {
    id: int('id').autoincrement().primaryKey(),
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    kind: varchar('kind', { length: 16, enum: ['deciduous', 'evergreen', 'structure'] }).notNull(),
    heightM: double('height_m').notNull(),
    /** GeoJSON LineString or Polygon geometry. */
    geometry: mediumtext('geometry').notNull(),
    /** 'MM-DD' season when deciduous trees are bare (they then do not block). */
    leaflessFrom: varchar('leafless_from', { length: 5 }),
    leaflessTo: varchar('leafless_to', { length: 5 }),
    note: varchar('note', { length: 1000 }).notNull().default(''),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('obstructions_farm_idx').on(t.farmId)],
)

/** An uploaded (or fetched) orbit file: TLE, CCSDS OMM (JSON/XML) or a YUMA almanac. */
export const orbitSets = mysqlTable(
  'orbit_sets',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 160 }).notNull(),
    source: varchar('source', { length: 16, enum: ['upload', 'feed'] }).notNull(),
    format: varchar('format', { length: 16 }).notNull(),
    /** The file as received, parsed again by the engine when forecasts need it. */
    content: mediumtext('content').notNull(),
    satelliteCount: int('satellite_count').notNull(),
    skippedCount: int('skipped_count').notNull(),
    /** JSON array of per-record problems: { record, line, message }. */
    reportJson: mediumtext('report_json').notNull(),
    oldestEpoch: at('oldest_epoch'),
    newestEpoch: at('newest_epoch'),
    uploadedBy: int('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('orbit_sets_created_idx').on(t.createdAt)],
)

/** The satellites of an orbit set, for listing and element-age warnings. */
export const orbitSatellites = mysqlTable(
  'orbit_satellites',
  {
    orbitSetId: int('orbit_set_id')
      .notNull()
      .references(() => orbitSets.id, { onDelete: 'cascade' }),
    satId: varchar('sat_id', { length: 32 }).notNull(),
    name: varchar('name', { length: 80 }).notNull().default(''),
    system: varchar('system', { length: 16 }).notNull(),
    epoch: at('epoch').notNull(),
  },
  (t) => [primaryKey({ columns: [t.orbitSetId, t.satId] })],
)

/**
 * Which orbit data counts for each constellation: an orbit set, or the nominal
 * constellation when orbitSetId is null; `enabled` false leaves the constellation out.
 */
export const activeOrbits = mysqlTable('active_orbits', {
  system: varchar('system', { length: 16 }).primaryKey(),
  orbitSetId: int('orbit_set_id').references(() => orbitSets.id, { onDelete: 'set null' }),
  enabled: boolean('enabled').notNull().default(true),
  updatedAt: updatedAt(),
})

/** A satellite out of service for a time span. */
export const outages = mysqlTable(
  'outages',
  {
    id: int('id').autoincrement().primaryKey(),
    satId: varchar('sat_id', { length: 32 }).notNull(),
    fromAt: at('from_at').notNull(),
    toAt: at('to_at').notNull(),
    note: varchar('note', { length: 1000 }).notNull().default(''),
    createdBy: int('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('outages_span_idx').on(t.fromAt, t.toAt)],
)

/**
 * Background jobs. Rows are claimed with SELECT ... FOR UPDATE SKIP LOCKED, so several
 * server processes on one database never run the same job.
 */
export const jobs = mysqlTable(
  'jobs',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    kind: varchar('kind', { length: 40 }).notNull(),
    fieldId: int('field_id'),
    farmId: int('farm_id'),
    /** Jobs with the same key supersede each other while queued (e.g. 'forecast:field:12'). */
    dedupeKey: varchar('dedupe_key', { length: 120 }),
    inputsVersion: varchar('inputs_version', { length: 64 }).notNull().default(''),
    payloadJson: mediumtext('payload_json').notNull(),
    status: varchar('status', { length: 16, enum: ['queued', 'running', 'done', 'failed', 'superseded'] }).notNull(),
    progress: double('progress').notNull().default(0),
    attempts: smallint('attempts').notNull().default(0),
    maxAttempts: smallint('max_attempts').notNull().default(4),
    runAfter: at('run_after').notNull().$defaultFn(now),
    lockedBy: varchar('locked_by', { length: 80 }),
    heartbeatAt: at('heartbeat_at'),
    startedAt: at('started_at'),
    finishedAt: at('finished_at'),
    error: text('error'),
    resultJson: text('result_json'),
    createdBy: int('created_by'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index('jobs_claim_idx').on(t.status, t.runAfter),
    index('jobs_dedupe_idx').on(t.dedupeKey, t.status),
    index('jobs_field_idx').on(t.fieldId, t.status),
  ],
)

/**
 * One column per hour figure of the shared schema (shared/schemas/forecast.ts), named in
 * snake case (h95MedianM -> h95_median_m): SMALLINT for an integer figure, DOUBLE for any
 * other, NOT NULL DEFAULT 0 for a figure that is never null. (The type names every number
 * column a double: both read and write as a number.)
 */
function hourFigureColumns() {
  type Column<V> = null extends V
    ? MySqlDoubleBuilderInitial<string>
    : HasDefault<NotNull<MySqlDoubleBuilderInitial<string>>>
  const columns: Record<string, unknown> = {}
  for (const [key, figure] of Object.entries(hourFiguresSchema.shape)) {
    const name = key.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)
    const nullable = figure instanceof ZodNullable
    const inner = (nullable ? figure.unwrap() : figure) as { format?: string | null }
    const column = inner.format === 'safeint' ? smallint(name) : double(name)
    columns[key] = nullable ? column : column.notNull().default(0)
  }
  return columns as { [K in keyof HourFigures]: Column<HourFigures[K]> }
}

/** One stored forecast hour of a field (UTC hour start); replaced whole by each job. */
export const forecastHours = mysqlTable(
  'forecast_hours',
  {
    fieldId: int('field_id')
      .notNull()
      .references(() => fields.id, { onDelete: 'cascade' }),
    hourStart: at('hour_start').notNull(),
    ...hourFigureColumns(),
    /** JSON object keyed by work type id: { share, shareN1, state: 'clear'|'tight'|'closed' }. */
    workJson: text('work_json').notNull(),
    /** Everything else the engine reports for the hour, as JSON. */
    extraJson: text('extra_json'),
    orbitSummary: varchar('orbit_summary', { length: 255 }).notNull().default(''),
    inputsVersion: varchar('inputs_version', { length: 64 }).notNull(),
    jobId: bigint('job_id', { mode: 'number' }),
    computedAt: at('computed_at').notNull().$defaultFn(now),
  },
  (t) => [primaryKey({ columns: [t.fieldId, t.hourStart] }), index('forecast_hours_hour_idx').on(t.hourStart)],
)

/**
 * What a field's stored forecast holds, one row per field with stored hours: written in
 * the same transaction as the hours (by the job that stores them, and by pruning), so the
 * forecast read path and the staleness checks read one row instead of aggregating hours.
 */
export const fieldForecasts = mysqlTable('field_forecasts', {
  fieldId: int('field_id')
    .primaryKey()
    .references(() => fields.id, { onDelete: 'cascade' }),
  hours: int('hours').notNull(),
  firstHour: at('first_hour').notNull(),
  lastHour: at('last_hour').notNull(),
  /** Lowest and highest inputs version among the hours (equal when stored by one job). */
  minVersion: varchar('min_version', { length: 64 }).notNull(),
  maxVersion: varchar('max_version', { length: 64 }).notNull(),
  computedAt: at('computed_at').notNull(),
  orbitSummary: varchar('orbit_summary', { length: 255 }).notNull().default(''),
  maxJobId: bigint('max_job_id', { mode: 'number' }),
})

/** A booked pass: a field, a kind of work, a machine and crew, a start and a duration. */
export const passes = mysqlTable(
  'passes',
  {
    id: int('id').autoincrement().primaryKey(),
    fieldId: int('field_id')
      .notNull()
      .references(() => fields.id, { onDelete: 'cascade' }),
    workTypeId: int('work_type_id')
      .notNull()
      .references(() => workTypes.id),
    machineId: int('machine_id').references(() => machines.id, { onDelete: 'set null' }),
    startAt: at('start_at').notNull(),
    durationMin: int('duration_min').notNull(),
    status: varchar('status', { length: 16, enum: ['planned', 'confirmed', 'started', 'done', 'cancelled'] }).notNull(),
    /** When and by whom the status was last set (null for passes older than the column). */
    statusChangedAt: at('status_changed_at'),
    statusChangedBy: int('status_changed_by').references(() => users.id, { onDelete: 'set null' }),
    /**
     * Bumped by every change a person makes (not by the at-risk check), so that a change
     * made from an older copy (an offline cab) is refused with 409 instead of overwriting.
     */
    version: int('version').notNull().default(1),
    atRisk: boolean('at_risk').notNull().default(false),
    atRiskReason: varchar('at_risk_reason', { length: 500 }),
    suggestedStartAt: at('suggested_start_at'),
    notes: text('notes').notNull(),
    createdBy: int('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index('passes_field_idx').on(t.fieldId, t.startAt),
    index('passes_machine_idx').on(t.machineId, t.startAt),
    index('passes_start_idx').on(t.startAt),
  ],
)

/** Calendar (.ics) feed tokens per farm; only a hash is kept, the admin can revoke. */
export const calendarTokens = mysqlTable(
  'calendar_tokens',
  {
    id: int('id').autoincrement().primaryKey(),
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    tokenHash: varchar('token_hash', { length: 64 }).notNull(),
    label: varchar('label', { length: 120 }).notNull().default(''),
    includeWindows: boolean('include_windows').notNull().default(false),
    createdBy: int('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    revokedAt: at('revoked_at'),
  },
  (t) => [uniqueIndex('calendar_tokens_hash_unique').on(t.tokenHash), index('calendar_tokens_farm_idx').on(t.farmId)],
)

/** A weekly plan of a farm as composed (each edit-and-send makes a new revision). */
export const planRevisions = mysqlTable(
  'plan_revisions',
  {
    id: int('id').autoincrement().primaryKey(),
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    /** Monday of the plan's week in the farm's time zone. */
    weekStart: date('week_start', { mode: 'string' }).notNull(),
    revision: int('revision').notNull(),
    note: text('note').notNull(),
    subject: varchar('subject', { length: 300 }).notNull(),
    html: mediumtext('html').notNull(),
    textBody: mediumtext('text_body').notNull(),
    ics: mediumtext('ics').notNull(),
    createdBy: int('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('plan_revisions_unique').on(t.farmId, t.weekStart, t.revision)],
)

/** One delivery of a plan revision to one recipient; the idempotency key is unique. */
export const planSends = mysqlTable(
  'plan_sends',
  {
    id: int('id').autoincrement().primaryKey(),
    revisionId: int('revision_id')
      .notNull()
      .references(() => planRevisions.id, { onDelete: 'cascade' }),
    recipient: varchar('recipient', { length: 254 }).notNull(),
    userId: int('user_id').references(() => users.id, { onDelete: 'set null' }),
    idempotencyKey: varchar('idempotency_key', { length: 200 }).notNull(),
    status: varchar('status', { length: 16, enum: ['queued', 'sent', 'failed', 'opted-out'] }).notNull(),
    messageId: varchar('message_id', { length: 255 }),
    error: text('error'),
    attempts: smallint('attempts').notNull().default(0),
    sentBy: int('sent_by').references(() => users.id, { onDelete: 'set null' }),
    automatic: boolean('automatic').notNull().default(false),
    sentAt: at('sent_at'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('plan_sends_key_unique').on(t.idempotencyKey), index('plan_sends_revision_idx').on(t.revisionId)],
)

/** Automatic weekly send of a farm's plan, in the farm's time zone. */
export const planSchedules = mysqlTable('plan_schedules', {
  farmId: int('farm_id')
    .primaryKey()
    .references(() => farms.id, { onDelete: 'cascade' }),
  enabled: boolean('enabled').notNull().default(false),
  /** ISO weekday, 1 = Monday. */
  weekday: smallint('weekday').notNull().default(1),
  /** 'HH:MM' local time. */
  localTime: varchar('local_time', { length: 5 }).notNull().default('07:00'),
  /** Monday (YYYY-MM-DD) of the last week that was sent automatically. */
  lastSentWeek: varchar('last_sent_week', { length: 10 }),
  updatedAt: updatedAt(),
})

/** Recipients who asked to receive no more plans of a farm. */
export const planOptOuts = mysqlTable(
  'plan_opt_outs',
  {
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    email: varchar('email', { length: 254 }).notNull(),
    optedOutAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.farmId, t.email] })],
)

export type BaseStationRow = typeof baseStations.$inferSelect
export type CorrectionNetworkRow = typeof correctionNetworks.$inferSelect
export type KpBlockRow = typeof kpBlocks.$inferSelect
export type ServiceLevelRow = typeof serviceLevels.$inferSelect
export type WorkTypeRow = typeof workTypes.$inferSelect
export type MachineRow = typeof machines.$inferSelect
export type FieldRow = typeof fields.$inferSelect
export type ObstructionRow = typeof obstructions.$inferSelect
export type OrbitSetRow = typeof orbitSets.$inferSelect
export type OutageRow = typeof outages.$inferSelect
export type JobRow = typeof jobs.$inferSelect
export type ForecastHourRow = typeof forecastHours.$inferSelect
export type FieldForecastRow = typeof fieldForecasts.$inferSelect
export type PassRow = typeof passes.$inferSelect
export type PlanRevisionRow = typeof planRevisions.$inferSelect
export type PlanSendRow = typeof planSends.$inferSelect
