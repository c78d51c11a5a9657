// The database schema (MariaDB). Migrations in drizzle/ are generated from this file with
// `npm run db:generate` and never edited by hand.
//
// Times are DATETIME(3) in UTC: Drizzle writes Date values as UTC strings and reads them back
// as UTC, and defaults are set in the application, so the server's time zone never matters.
import {
  boolean,
  customType,
  datetime,
  index,
  int,
  mediumtext,
  mysqlTable,
  primaryKey,
  text,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core'

const now = () => new Date()
const createdAt = () => datetime('created_at', { mode: 'date', fsp: 3 }).notNull().$defaultFn(now)
const updatedAt = () =>
  datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().$defaultFn(now).$onUpdateFn(now)

/** LONGBLOB holding raw bytes (Drizzle has no built-in blob column for MySQL). */
const longblob = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => 'longblob',
})

/** The one contracting business that runs this installation (a single row, id 1). */
export const business = mysqlTable('business', {
  id: int('id').primaryKey(),
  name: varchar('name', { length: 160 }).notNull(),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
})

export const users = mysqlTable(
  'users',
  {
    id: int('id').autoincrement().primaryKey(),
    email: varchar('email', { length: 254 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    role: varchar('role', { length: 16, enum: ['admin', 'office', 'contractor', 'client'] }).notNull(),
    active: boolean('active').notNull().default(true),
    units: varchar('units', { length: 16, enum: ['metric', 'imperial'] }).notNull().default('metric'),
    /** argon2id PHC string; null until an invited user sets a password. */
    passwordHash: varchar('password_hash', { length: 255 }),
    lastSignInAt: datetime('last_sign_in_at', { mode: 'date', fsp: 3 }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('users_email_unique').on(t.email), index('users_role_idx').on(t.role)],
)

/** lucia sessions (id, user, expiry, sign-in time). */
export const sessions = mysqlTable(
  'sessions',
  {
    id: varchar('id', { length: 255 }).primaryKey(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
    /** When the user signed in (null for sessions opened before this column existed). */
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).$defaultFn(now),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
)

/** One-time tokens for password reset and invitation links; only a SHA-256 hash is kept. */
export const authTokens = mysqlTable(
  'auth_tokens',
  {
    id: int('id').autoincrement().primaryKey(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    purpose: varchar('purpose', { length: 16, enum: ['reset', 'invite'] }).notNull(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull(),
    expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
    usedAt: datetime('used_at', { mode: 'date', fsp: 3 }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('auth_tokens_hash_unique').on(t.tokenHash), index('auth_tokens_user_idx').on(t.userId)],
)

export const farms = mysqlTable(
  'farms',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 120 }).notNull(),
    timeZone: varchar('time_zone', { length: 64 }).notNull(),
    address: varchar('address', { length: 500 }).notNull().default(''),
    notes: text('notes').notNull(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('farms_name_unique').on(t.name)],
)

/** Which client users see which farms. */
export const farmClients = mysqlTable(
  'farm_clients',
  {
    farmId: int('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.farmId, t.userId] }), index('farm_clients_user_idx').on(t.userId)],
)

/** Messages received by the local fake SMTP server (shown on the Mailbox page). */
export const mailboxMessages = mysqlTable(
  'mailbox_messages',
  {
    id: int('id').autoincrement().primaryKey(),
    messageId: varchar('message_id', { length: 255 }).notNull().default(''),
    fromAddress: varchar('from_address', { length: 500 }).notNull().default(''),
    toAddresses: text('to_addresses').notNull(),
    subject: varchar('subject', { length: 500 }).notNull().default(''),
    receivedAt: datetime('received_at', { mode: 'date', fsp: 3 }).notNull().$defaultFn(now),
    sizeBytes: int('size_bytes').notNull(),
    hasAttachments: boolean('has_attachments').notNull().default(false),
    /** JSON array of { filename, contentType, size }. */
    attachmentsJson: text('attachments_json').notNull(),
    textBody: mediumtext('text_body').notNull(),
    htmlBody: mediumtext('html_body').notNull(),
    raw: longblob('raw').notNull(),
  },
  (t) => [index('mailbox_received_idx').on(t.receivedAt)],
)

export type UserRow = typeof users.$inferSelect
export type FarmRow = typeof farms.$inferSelect
export type MailboxRow = typeof mailboxMessages.$inferSelect
export type AuthTokenRow = typeof authTokens.$inferSelect

/** Admin actions (role, activity and farm-access changes, work types): who did what, when. */
export const auditEvents = mysqlTable(
  'audit_events',
  {
    id: int('id').autoincrement().primaryKey(),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().$defaultFn(now),
    /** The admin who acted; null once that user is deleted (the name is kept). */
    actorId: int('actor_id').references(() => users.id, { onDelete: 'set null' }),
    actorName: varchar('actor_name', { length: 120 }).notNull(),
    action: varchar('action', { length: 40 }).notNull(),
    targetType: varchar('target_type', { length: 20 }).notNull(),
    targetId: int('target_id').notNull(),
    targetName: varchar('target_name', { length: 254 }).notNull(),
    /** JSON object { key: { from, to } }. */
    changesJson: text('changes_json').notNull(),
  },
  (t) => [index('audit_at_idx').on(t.at), index('audit_target_idx').on(t.targetType, t.targetId)],
)
export type AuditEventRow = typeof auditEvents.$inferSelect
