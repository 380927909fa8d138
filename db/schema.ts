import { relations, sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  customType,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from 'drizzle-orm/pg-core';

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'bytea' });
const timestamptz = (name: string) => timestamp(name, { withTimezone: true, mode: 'date' });

export const roleEnum = pgEnum('role', ['technician', 'expert', 'reviewer', 'admin']);
export const screwKindEnum = pgEnum('screw_kind', ['corner', 'middle', 'outrigger']);
export const sessionStateEnum = pgEnum('session_state', ['planned', 'live', 'ended', 'in_review', 'approved', 'returned']);

export const organisations = pgTable('organisations', {
  id: uuid('id').primaryKey().defaultRandom(),
  name: text('name').notNull(),
  createdAt: timestamptz('created_at').notNull().defaultNow(),
});

export const users = pgTable(
  'users',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    organisationId: uuid('organisation_id')
      .notNull()
      .references(() => organisations.id),
    email: text('email').notNull(),
    name: text('name').notNull(),
    role: roleEnum('role').notNull(),
    passwordHash: text('password_hash').notNull(),
    unitSystem: text('unit_system', { enum: ['inch', 'metric'] }).notNull().default('inch'),
    active: boolean('active').notNull().default(true),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [uniqueIndex('users_email_unique').on(sql`lower(${t.email})`)],
);

export const customers = pgTable('customers', {
  id: uuid('id').primaryKey().defaultRandom(),
  organisationId: uuid('organisation_id')
    .notNull()
    .references(() => organisations.id),
  name: text('name').notNull(),
  createdAt: timestamptz('created_at').notNull().defaultNow(),
});

export const sites = pgTable('sites', {
  id: uuid('id').primaryKey().defaultRandom(),
  organisationId: uuid('organisation_id')
    .notNull()
    .references(() => organisations.id),
  customerId: uuid('customer_id')
    .notNull()
    .references(() => customers.id),
  name: text('name').notNull(),
  address: text('address').notNull().default(''),
  floorNotes: text('floor_notes').notNull().default(''),
  createdAt: timestamptz('created_at').notNull().defaultNow(),
});

export const machines = pgTable(
  'machines',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    organisationId: uuid('organisation_id')
      .notNull()
      .references(() => organisations.id),
    siteId: uuid('site_id')
      .notNull()
      .references(() => sites.id),
    model: text('model').notNull(),
    serial: text('serial').notNull(),
    tableLengthMm: doublePrecision('table_length_mm').notNull(),
    tableWidthMm: doublePrecision('table_width_mm').notNull(),
    travelXMm: doublePrecision('travel_x_mm').notNull(),
    travelYMm: doublePrecision('travel_y_mm').notNull(),
    travelZMm: doublePrecision('travel_z_mm').notNull(),
    checkIntervalMonths: integer('check_interval_months').notNull().default(9),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [index('machines_org_idx').on(t.organisationId)],
);

/** A machine's footprint: one row per leveling screw. x, y in mm from the table centre, +x right, +y back. */
export const screws = pgTable(
  'screws',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    machineId: uuid('machine_id')
      .notNull()
      .references(() => machines.id, { onDelete: 'cascade' }),
    label: text('label').notNull(),
    kind: screwKindEnum('kind').notNull(),
    xMm: doublePrecision('x_mm').notNull(),
    yMm: doublePrecision('y_mm').notNull(),
    pitchMm: doublePrecision('pitch_mm').notNull(),
    specHeightMm: doublePrecision('spec_height_mm'),
  },
  (t) => [uniqueIndex('screws_machine_label_unique').on(t.machineId, t.label)],
);

export const levelingSessions = pgTable(
  'leveling_sessions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    organisationId: uuid('organisation_id')
      .notNull()
      .references(() => organisations.id),
    machineId: uuid('machine_id')
      .notNull()
      .references(() => machines.id),
    technicianId: uuid('technician_id')
      .notNull()
      .references(() => users.id),
    state: sessionStateEnum('state').notNull().default('live'),
    /** Sensitivity of the session's precision level: slope per division, µrad. */
    levelDivisionUrad: doublePrecision('level_division_urad').notNull(),
    /** Highest seq stored; bumped inside the append transaction (row lock keeps seq gapless). */
    lastSeq: bigint('last_seq', { mode: 'number' }).notNull().default(0),
    lastHash: text('last_hash').notNull().default(''),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [index('leveling_sessions_org_idx').on(t.organisationId)],
);

/** The append-only log of a session: the one source of truth. Never updated, never deleted. */
export const sessionEvents = pgTable(
  'session_events',
  {
    sessionId: uuid('session_id')
      .notNull()
      .references(() => levelingSessions.id),
    seq: bigint('seq', { mode: 'number' }).notNull(),
    id: uuid('id').notNull(),
    type: text('type').notNull(),
    payload: jsonb('payload').notNull(),
    actorId: uuid('actor_id').references(() => users.id),
    actorRole: text('actor_role').notNull(),
    clientTs: timestamptz('client_ts'),
    serverTs: timestamptz('server_ts').notNull(),
    prevHash: text('prev_hash').notNull(),
    hash: text('hash').notNull(),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.seq] }), uniqueIndex('session_events_id_unique').on(t.id)],
);

/** Needed by @socket.io/postgres-adapter for payloads over 8,000 bytes; it does not create it itself. */
export const socketIoAttachments = pgTable('socket_io_attachments', {
  id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
  createdAt: timestamptz('created_at').defaultNow(),
  payload: bytea('payload'),
});

export const usersRelations = relations(users, ({ one }) => ({
  organisation: one(organisations, { fields: [users.organisationId], references: [organisations.id] }),
}));
export const machinesRelations = relations(machines, ({ one, many }) => ({
  site: one(sites, { fields: [machines.siteId], references: [sites.id] }),
  screws: many(screws),
}));
export const screwsRelations = relations(screws, ({ one }) => ({
  machine: one(machines, { fields: [screws.machineId], references: [machines.id] }),
}));
export const sitesRelations = relations(sites, ({ one, many }) => ({
  customer: one(customers, { fields: [sites.customerId], references: [customers.id] }),
  machines: many(machines),
}));
export const levelingSessionsRelations = relations(levelingSessions, ({ one }) => ({
  machine: one(machines, { fields: [levelingSessions.machineId], references: [machines.id] }),
  technician: one(users, { fields: [levelingSessions.technicianId], references: [users.id] }),
}));

export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;
export type Machine = typeof machines.$inferSelect;
export type Screw = typeof screws.$inferSelect;
export type LevelingSession = typeof levelingSessions.$inferSelect;
export type SessionEventRow = typeof sessionEvents.$inferSelect;
export type Role = (typeof roleEnum.enumValues)[number];
