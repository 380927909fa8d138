import { relations, sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  customType,
  date,
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
export const instrumentKindEnum = pgEnum('instrument_kind', ['level', 'indicator']);
export const visitStateEnum = pgEnum('visit_state', ['scheduled', 'in_progress', 'completed', 'cancelled']);
export const sessionStateEnum = pgEnum('session_state', ['planned', 'live', 'ended', 'in_review', 'approved', 'returned']);
/** A participant's part in a session: the technician measures and turns screws, experts coach, observers watch. */
export const sessionPartEnum = pgEnum('session_part', ['technician', 'expert', 'observer']);

export const organisations = pgTable('organisations', {
  id: uuid('id').primaryKey().defaultRandom(),
  name: text('name').notNull(),
  /** Days before a machine falls due (or a visit starts) that reminders go out. */
  reminderDaysBefore: integer('reminder_days_before').notNull().default(14),
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
  notes: text('notes').notNull().default(''),
  createdAt: timestamptz('created_at').notNull().defaultNow(),
});

/** People at a customer: the maintenance lead who receives the report, the one who holds lockout authority. */
export const contacts = pgTable(
  'contacts',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    organisationId: uuid('organisation_id')
      .notNull()
      .references(() => organisations.id),
    customerId: uuid('customer_id')
      .notNull()
      .references(() => customers.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    email: text('email').notNull().default(''),
    phone: text('phone').notNull().default(''),
    position: text('position').notNull().default(''),
    receivesReports: boolean('receives_reports').notNull().default(false),
  },
  (t) => [index('contacts_customer_idx').on(t.customerId)],
);

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
  /** Slab, isolation pads, anchoring, grout: what the machine stands on. */
  floorNotes: text('floor_notes').notNull().default(''),
  accessNotes: text('access_notes').notNull().default(''),
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
    /** The last leveling on record from before Levelwire (paper or imported); approved sessions supersede it. */
    priorLeveledOn: date('prior_leveled_on', { mode: 'string' }),
    /** Tolerances overriding Levelwire's defaults; null means the default (twist and bow 20 µrad, sweep 12.7 µm TIR). */
    twistTolUrad: doublePrecision('twist_tol_urad'),
    bowTolUrad: doublePrecision('bow_tol_urad'),
    sweepTolUm: doublePrecision('sweep_tol_um'),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [
    index('machines_org_idx').on(t.organisationId),
    uniqueIndex('machines_org_serial_unique').on(t.organisationId, t.serial),
    index('machines_org_model_idx').on(t.organisationId, t.model),
    index('machines_site_idx').on(t.siteId),
  ],
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
    /** Threads per inch when the thread was given that way (pitchMm is then 25.4 / tpi). */
    threadTpi: doublePrecision('thread_tpi'),
    /** Lift per turn when it is not one pitch (wedge or differential pads). */
    liftPerTurnMm: doublePrecision('lift_per_turn_mm'),
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
    visitId: uuid('visit_id').references(() => visits.id),
    state: sessionStateEnum('state').notNull().default('live'),
    /** When a reviewer approved the record: the machine's next check is due from here. */
    approvedAt: timestamptz('approved_at'),
    /** Sensitivity of the session's precision level: slope per division, µrad. */
    levelDivisionUrad: doublePrecision('level_division_urad').notNull(),
    /** Highest seq stored; bumped inside the append transaction (row lock keeps seq gapless). */
    lastSeq: bigint('last_seq', { mode: 'number' }).notNull().default(0),
    lastHash: text('last_hash').notNull().default(''),
    /** A demo session worked by the virtual technician: the simulator's seed. Null for real sessions. */
    virtualSeed: integer('virtual_seed'),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [index('leveling_sessions_org_idx').on(t.organisationId), index('leveling_sessions_machine_approved_idx').on(t.machineId, t.approvedAt)],
);

/** A precision level or an indicator, with its calibration. */
export const instruments = pgTable(
  'instruments',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    organisationId: uuid('organisation_id')
      .notNull()
      .references(() => organisations.id),
    kind: instrumentKindEnum('kind').notNull(),
    model: text('model').notNull(),
    serial: text('serial').notNull(),
    /** Level: slope per division in `sensitivityUnit` (a SlopeUnit of lib/leveling). */
    sensitivityValue: doublePrecision('sensitivity_value'),
    sensitivityUnit: text('sensitivity_unit'),
    vialCount: integer('vial_count'),
    /** Indicator: smallest graduation, µm, and range, mm. */
    resolutionUm: doublePrecision('resolution_um'),
    rangeMm: doublePrecision('range_mm'),
    calibratedOn: date('calibrated_on', { mode: 'string' }),
    calibrationDue: date('calibration_due', { mode: 'string' }).notNull(),
    certificateKey: text('certificate_key'),
    certificateName: text('certificate_name'),
    certificateType: text('certificate_type'),
    certificateBytes: integer('certificate_bytes'),
    active: boolean('active').notNull().default(true),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [uniqueIndex('instruments_org_serial_unique').on(t.organisationId, t.kind, t.serial)],
);

/** A scheduled service call for one machine. */
export const visits = pgTable(
  'visits',
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
    expertId: uuid('expert_id').references(() => users.id),
    scheduledFor: timestamptz('scheduled_for').notNull(),
    state: visitStateEnum('state').notNull().default('scheduled'),
    notes: text('notes').notNull().default(''),
    createdById: uuid('created_by_id')
      .notNull()
      .references(() => users.id),
    reminderSentAt: timestamptz('reminder_sent_at'),
    createdAt: timestamptz('created_at').notNull().defaultNow(),
  },
  (t) => [index('visits_org_scheduled_idx').on(t.organisationId, t.scheduledFor)],
);

/** Instruments chosen for a visit; one past its calibration due date needs an admin's written override. */
export const visitInstruments = pgTable(
  'visit_instruments',
  {
    visitId: uuid('visit_id')
      .notNull()
      .references(() => visits.id, { onDelete: 'cascade' }),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id),
    overrideReason: text('override_reason'),
    overrideById: uuid('override_by_id').references(() => users.id),
    overrideAt: timestamptz('override_at'),
  },
  (t) => [primaryKey({ columns: [t.visitId, t.instrumentId] })],
);

/** One reminder per machine and due date, so the reminder job can run any number of times. */
export const dueReminders = pgTable(
  'due_reminders',
  {
    machineId: uuid('machine_id')
      .notNull()
      .references(() => machines.id, { onDelete: 'cascade' }),
    dueOn: date('due_on', { mode: 'string' }).notNull(),
    sentAt: timestamptz('sent_at').notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.machineId, t.dueOn] })],
);

/** An invitation to join an organisation; only the token's hash is stored. */
export const invitations = pgTable('invitations', {
  id: uuid('id').primaryKey().defaultRandom(),
  organisationId: uuid('organisation_id')
    .notNull()
    .references(() => organisations.id),
  email: text('email').notNull(),
  role: roleEnum('role').notNull(),
  tokenHash: text('token_hash').notNull().unique(),
  invitedById: uuid('invited_by_id')
    .notNull()
    .references(() => users.id),
  expiresAt: timestamptz('expires_at').notNull(),
  acceptedAt: timestamptz('accepted_at'),
  createdAt: timestamptz('created_at').notNull().defaultNow(),
});

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
    /**
     * Who acted: no foreign key, because a log imported from elsewhere keeps its actors' ids unchanged (they are part
     * of the hash) though those people have no account here.
     */
    actorId: uuid('actor_id'),
    actorRole: text('actor_role').notNull(),
    clientTs: timestamptz('client_ts'),
    serverTs: timestamptz('server_ts').notNull(),
    prevHash: text('prev_hash').notNull(),
    hash: text('hash').notNull(),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.seq] }), uniqueIndex('session_events_id_unique').on(t.id)],
);

/** Needed by @socket.io/postgres-adapter for payloads over 8,000 bytes; it does not create it itself. */
/** Who takes part in a session besides reading it (reviewers and admins of the organisation read every session). */
export const sessionParticipants = pgTable(
  'session_participants',
  {
    sessionId: uuid('session_id')
      .notNull()
      .references(() => levelingSessions.id),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id),
    part: sessionPartEnum('part').notNull(),
    addedAt: timestamptz('added_at').notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.userId] }), index('session_participants_user_idx').on(t.userId)],
);

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
export const customersRelations = relations(customers, ({ many }) => ({
  sites: many(sites),
  contacts: many(contacts),
}));
/** Sign-in failure counters for rate-limiter-flexible's PostgreSQL store (its documented columns). */
export const signInLimits = pgTable('sign_in_limits', {
  key: text('key').primaryKey(),
  points: integer('points').notNull().default(0),
  expire: bigint('expire', { mode: 'number' }),
});

export const contactsRelations = relations(contacts, ({ one }) => ({
  customer: one(customers, { fields: [contacts.customerId], references: [customers.id] }),
}));
export const visitsRelations = relations(visits, ({ one, many }) => ({
  machine: one(machines, { fields: [visits.machineId], references: [machines.id] }),
  technician: one(users, { fields: [visits.technicianId], references: [users.id], relationName: 'visitTechnician' }),
  expert: one(users, { fields: [visits.expertId], references: [users.id], relationName: 'visitExpert' }),
  instruments: many(visitInstruments),
}));
export const visitInstrumentsRelations = relations(visitInstruments, ({ one }) => ({
  visit: one(visits, { fields: [visitInstruments.visitId], references: [visits.id] }),
  instrument: one(instruments, { fields: [visitInstruments.instrumentId], references: [instruments.id] }),
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
export type SessionPart = (typeof sessionPartEnum.enumValues)[number];
export type Role = (typeof roleEnum.enumValues)[number];
export type Instrument = typeof instruments.$inferSelect;
export type Visit = typeof visits.$inferSelect;
export type Customer = typeof customers.$inferSelect;
export type Site = typeof sites.$inferSelect;
