import { sql } from 'drizzle-orm';
import {
  type AnyPgColumn,
  bigserial,
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  numeric,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from 'drizzle-orm/pg-core';
import { cutterStatuses, positionClasses, type DiscCondition } from '../../shared/cutters';
import { projectRoles } from '../../shared/roles';

const createdAt = () => timestamp({ withTimezone: true }).notNull().defaultNow();

export const projectRoleEnum = pgEnum('project_role', projectRoles);
export const driveDirectionEnum = pgEnum('drive_direction', ['increasing', 'decreasing']);
export const tokenPurposeEnum = pgEnum('token_purpose', ['password_reset', 'invitation']);

export const users = pgTable(
  'users',
  {
    id: uuid().primaryKey().defaultRandom(),
    /** Stored lower-cased; unique. */
    email: text().notNull(),
    name: text().notNull(),
    /** Null until an invited user sets a password. */
    passwordHash: text(),
    isAdmin: boolean().notNull().default(false),
    active: boolean().notNull().default(true),
    createdAt: createdAt(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('users_email_key').on(t.email)],
);

/** One project is one TBM drive. */
export const projects = pgTable(
  'projects',
  {
    id: uuid().primaryKey().defaultRandom(),
    name: text().notNull(),
    machineDescription: text().notNull().default(''),
    excavatedDiameterM: doublePrecision().notNull(),
    startChainageM: doublePrecision().notNull().default(0),
    /** Whether chainage increases or decreases as the machine advances. */
    driveDirection: driveDirectionEnum().notNull().default('increasing'),
    siteTimeZone: text().notNull(),
    units: text().notNull().default('metric'),
    /** Length of one ring (m), to turn chainage into ring numbers. */
    ringLengthM: doublePrecision().notNull().default(1.5),
    /**
     * Site rule: a stop where the groundwater head above the axis exceeds this (m) is worked under
     * compressed air. Set by the site; the default suits a drained hard-rock drive (no source).
     */
    compressedAirAboveHeadM: doublePrecision().notNull().default(30),
    createdAt: createdAt(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('projects_name_key').on(t.name)],
);

export const memberships = pgTable(
  'memberships',
  {
    id: uuid().primaryKey().defaultRandom(),
    userId: uuid()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    role: projectRoleEnum().notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('memberships_user_project_key').on(t.userId, t.projectId), index('memberships_project_idx').on(t.projectId)],
);

/** Server-side session rows, so sign-out, deactivation and password change can revoke a signed token. */
export const sessions = pgTable(
  'sessions',
  {
    id: uuid().primaryKey().defaultRandom(),
    userId: uuid()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    revokedAt: timestamp({ withTimezone: true }),
    userAgent: text(),
    ip: text(),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);

/** Who changed which record of the field, when, and what it was before and after. */
export const auditLog = pgTable(
  'audit_log',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    userId: uuid().references(() => users.id, { onDelete: 'set null' }),
    projectId: uuid().references(() => projects.id, { onDelete: 'cascade' }),
    entity: text().notNull(),
    entityId: text().notNull(),
    action: text().notNull(),
    before: jsonb(),
    after: jsonb(),
  },
  (t) => [index('audit_log_entity_idx').on(t.entity, t.entityId), index('audit_log_project_idx').on(t.projectId, t.at)],
);

/** One-time links (password reset, invitation). Only a SHA-256 of the token is stored. */
export const oneTimeTokens = pgTable(
  'one_time_tokens',
  {
    id: uuid().primaryKey().defaultRandom(),
    userId: uuid()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    purpose: tokenPurposeEnum().notNull(),
    tokenHash: text().notNull(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    usedAt: timestamp({ withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('one_time_tokens_hash_key').on(t.tokenHash)],
);

/** Sign-in attempts, kept in the database so rate limits hold across several server instances. */
export const signInAttempts = pgTable(
  'sign_in_attempts',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    email: text().notNull(),
    ip: text().notNull(),
    /** The known device the attempt came from (a device cookie of this account), or null. */
    deviceId: text(),
    succeeded: boolean().notNull(),
  },
  (t) => [index('sign_in_attempts_email_idx').on(t.email, t.at), index('sign_in_attempts_ip_idx').on(t.ip, t.at)],
);

/** Password-reset requests, counted per address asked for and per client address (decision 29). */
export const passwordResetRequests = pgTable(
  'password_reset_requests',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    email: text().notNull(),
    ip: text().notNull(),
  },
  (t) => [index('password_reset_requests_email_idx').on(t.email, t.at), index('password_reset_requests_ip_idx').on(t.ip, t.at)],
);

/** Mail waits here, written in the same transaction as the change that caused it, until sent. */
export const outbox = pgTable(
  'outbox',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    createdAt: createdAt(),
    projectId: uuid().references(() => projects.id, { onDelete: 'set null' }),
    kind: text().notNull(),
    toAddresses: text().array().notNull(),
    subject: text().notNull(),
    textBody: text().notNull(),
    htmlBody: text(),
    attempts: integer().notNull().default(0),
    nextAttemptAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp({ withTimezone: true }),
    /**
     * Set (and committed) before a message is handed to the SMTP server, cleared after. A row left
     * claimed but not sent means a crash mid-send: delivery is uncertain, so it is never resent
     * automatically — an administrator decides (DEVELOPERS.md, decision 8).
     */
    claimedAt: timestamp({ withTimezone: true }),
    lastError: text(),
    /** The stop a message is about (published, proposed, reminder), for Admin → Mail. */
    aboutStopId: uuid().references((): AnyPgColumn => stops.id, { onDelete: 'set null' }),
    /** The person a message is about (invitation, password reset), for Admin → Mail. */
    aboutUserId: uuid().references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [
    index('outbox_created_idx').on(t.createdAt),
    index('outbox_pending_idx')
      .on(t.nextAttemptAt)
      .where(sql`sent_at is null`),
  ],
);

/** Mail caught by the local fake SMTP server (development, demo, tests). */
export const caughtMail = pgTable(
  'caught_mail',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    fromAddress: text().notNull(),
    toAddresses: text().array().notNull(),
    subject: text().notNull(),
    textBody: text().notNull(),
    htmlBody: text(),
  },
  (t) => [index('caught_mail_received_idx').on(t.receivedAt)],
);

export const positionClassEnum = pgEnum('position_class', positionClasses);
export const cutterStatusEnum = pgEnum('cutter_status', cutterStatuses);
export const entryActionEnum = pgEnum('entry_action', ['none', 'changed']);

/** The places on the cutterhead where a disc cutter is mounted. */
export const positions = pgTable(
  'positions',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    number: integer().notNull(),
    trackRadiusMm: doublePrecision().notNull(),
    positionClass: positionClassEnum().notNull(),
    discSizeIn: doublePrecision().notNull(),
    /** Tilt of a gauge disc from the tunnel axis, degrees; null elsewhere. */
    tiltDeg: doublePrecision(),
    wearLimitMm: doublePrecision().notNull(),
    /** Centre positions often carry two discs on one hub. */
    twinDisc: boolean().notNull().default(false),
    /** Angle on the cutterhead picture, degrees; null = laid out evenly. */
    angleDeg: doublePrecision(),
    createdAt: createdAt(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('positions_project_number_key').on(t.projectId, t.number)],
);

/** Every disc cutter assembly, by serial number. */
export const cutters = pgTable(
  'cutters',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    serial: text().notNull(),
    discSizeIn: doublePrecision().notNull(),
    status: cutterStatusEnum().notNull().default('in_store'),
    rebuildCount: integer().notNull().default(0),
    notes: text().notNull().default(''),
    createdAt: createdAt(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('cutters_project_serial_key').on(t.projectId, t.serial), index('cutters_status_idx').on(t.projectId, t.status)],
);

/**
 * A fitted period: serial S sat on position P from … to …. The partial unique indexes make it
 * impossible to fit one serial in two places, or two serials on one position, at once.
 */
export const fittings = pgTable(
  'fittings',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    cutterId: uuid()
      .notNull()
      .references(() => cutters.id),
    positionId: uuid()
      .notNull()
      .references(() => positions.id),
    fittedAt: timestamp({ withTimezone: true }).notNull(),
    fittedChainageM: doublePrecision().notNull(),
    fittedRing: integer(),
    removedAt: timestamp({ withTimezone: true }),
    removedChainageM: doublePrecision(),
    removedRing: integer(),
    removalReason: text(),
    removalConditions: text().array().$type<DiscCondition[]>(),
  },
  (t) => [
    uniqueIndex('fittings_one_place_per_cutter')
      .on(t.cutterId)
      .where(sql`removed_at is null`),
    uniqueIndex('fittings_one_cutter_per_position')
      .on(t.positionId)
      .where(sql`removed_at is null`),
    index('fittings_position_idx').on(t.positionId, t.fittedAt),
  ],
);

/** The life of a serial: received, fitted, removed, rebuilt, returned to store, scrapped. */
export const cutterEvents = pgTable(
  'cutter_events',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    cutterId: uuid()
      .notNull()
      .references(() => cutters.id, { onDelete: 'cascade' }),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    kind: text().notNull(),
    positionId: uuid().references(() => positions.id),
    details: jsonb().notNull().default({}),
    userId: uuid().references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [index('cutter_events_cutter_idx').on(t.cutterId, t.at)],
);

/** An inspection round during a stop: where the machine stands, who walked the positions. */
export const inspectionRounds = pgTable(
  'inspection_rounds',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    startedAt: timestamp({ withTimezone: true }).notNull(),
    chainageM: doublePrecision().notNull(),
    ringNumber: integer(),
    crew: text().notNull().default(''),
    notes: text().notNull().default(''),
    closedAt: timestamp({ withTimezone: true }),
    createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('inspection_rounds_project_idx').on(t.projectId, t.startedAt)],
);

/** What the fitter recorded for one position in one round. `clientKey` makes resubmission harmless. */
export const inspectionEntries = pgTable(
  'inspection_entries',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    roundId: uuid()
      .notNull()
      .references(() => inspectionRounds.id, { onDelete: 'cascade' }),
    positionId: uuid()
      .notNull()
      .references(() => positions.id),
    clientKey: uuid().notNull(),
    /** The fitted period that was measured (the disc on the position when the fitter came). */
    fittingId: uuid().references(() => fittings.id),
    /** Radial ring wear, mm, one decimal; null = not measured. */
    wearMm: doublePrecision(),
    conditions: text()
      .array()
      .$type<DiscCondition[]>()
      .notNull()
      .default(sql`'{}'::text[]`),
    action: entryActionEnum().notNull().default('none'),
    removedCutterId: uuid().references(() => cutters.id),
    fittedCutterId: uuid().references(() => cutters.id),
    changeReason: text(),
    note: text().notNull().default(''),
    /** The fitter confirmed a lower wear than last time as a correction (audited). */
    remeasured: boolean().notNull().default(false),
    recordedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    recordedBy: uuid().references(() => users.id, { onDelete: 'set null' }),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('inspection_entries_client_key').on(t.projectId, t.clientKey),
    uniqueIndex('inspection_entries_round_position').on(t.roundId, t.positionId),
    index('inspection_entries_fitting_idx').on(t.fittingId),
  ],
);

/** Photos of a disc, stored outside the web root under generated names. */
export const photos = pgTable(
  'photos',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    entryId: uuid()
      .notNull()
      .references(() => inspectionEntries.id, { onDelete: 'cascade' }),
    clientKey: uuid().notNull(),
    storedName: text().notNull(),
    mimeType: text().notNull(),
    sizeBytes: integer().notNull(),
    originalName: text().notNull().default(''),
    uploadedBy: uuid().references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('photos_client_key').on(t.projectId, t.clientKey), index('photos_entry_idx').on(t.entryId)],
);

/**
 * Every submission of a position entry, by the client's idempotency key. A resent submission finds
 * its row here and changes nothing; an edit is a new submission of the same entry.
 */
export const entrySubmissions = pgTable(
  'entry_submissions',
  {
    clientKey: uuid().notNull(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    entryId: uuid()
      .notNull()
      .references(() => inspectionEntries.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.projectId, t.clientKey] }), index('entry_submissions_entry_idx').on(t.entryId)],
);

/** Ground types of the drive, with the abrasivity that drives the wear prior. */
export const groundTypes = pgTable(
  'ground_types',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    name: text().notNull(),
    description: text().notNull().default(''),
    ucsMpa: doublePrecision(),
    /** Cerchar Abrasivity Index. */
    cai: doublePrecision(),
    quartzPct: doublePrecision(),
    notes: text().notNull().default(''),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('ground_types_project_name_key').on(t.projectId, t.name)],
);

/** The geology long section: ground, water head and whether a stop is allowed, along chainage. */
export const geologySections = pgTable(
  'geology_sections',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    chainageFromM: doublePrecision().notNull(),
    chainageToM: doublePrecision().notNull(),
    groundTypeId: uuid()
      .notNull()
      .references(() => groundTypes.id),
    /** Groundwater head above the tunnel axis, m. */
    waterHeadM: doublePrecision().notNull().default(0),
    stopAllowed: boolean().notNull().default(true),
    stopReason: text().notNull().default(''),
  },
  (t) => [index('geology_sections_project_idx').on(t.projectId, t.chainageFromM)],
);

/** The advance log: one row per ring or stroke, as exported by the machine's data system. */
export const strokes = pgTable(
  'strokes',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    ringNumber: integer().notNull(),
    startTime: timestamp({ withTimezone: true }).notNull(),
    endTime: timestamp({ withTimezone: true }).notNull(),
    chainageStartM: doublePrecision().notNull(),
    chainageEndM: doublePrecision().notNull(),
    revolutions: doublePrecision(),
    penetrationMmPerRev: doublePrecision(),
    rpm: doublePrecision(),
    thrustKn: doublePrecision(),
    torqueKnm: doublePrecision(),
    extra: jsonb().notNull().default({}),
  },
  (t) => [
    uniqueIndex('strokes_project_ring_key').on(t.projectId, t.ringNumber),
    index('strokes_project_time_idx').on(t.projectId, t.startTime),
  ],
);

/** The column mapping a planner chose once per project and kind of import. */
export const importMappings = pgTable(
  'import_mappings',
  {
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    kind: text().notNull(),
    mapping: jsonb().notNull(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.projectId, t.kind] })],
);

/**
 * Distance rolled per disc during each fitted period, per ground type ('unknown' outside every
 * section), kept up to date on import, layout and geology changes (see services/rolled-distance.ts).
 */
export const fittingRolledKm = pgTable(
  'fitting_rolled_km',
  {
    fittingId: uuid()
      .notNull()
      .references(() => fittings.id, { onDelete: 'cascade' }),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    groundKey: text().notNull(),
    rolledKm: doublePrecision().notNull(),
  },
  (t) => [primaryKey({ columns: [t.fittingId, t.groundKey] }), index('fitting_rolled_km_project_idx').on(t.projectId)],
);

/** Up to which ring the rolled distances include, so new strokes add without a full recompute. */
export const rolledDistanceState = pgTable('rolled_distance_state', {
  projectId: uuid()
    .primaryKey()
    .references(() => projects.id, { onDelete: 'cascade' }),
  throughRing: integer().notNull(),
  computedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

/**
 * Distance rolled per disc by the measured disc from its fitting up to the inspection, per ground
 * type: the exposure of each observation in the wear fit. Kept with the fitted-period totals.
 */
export const entryRolledKm = pgTable(
  'entry_rolled_km',
  {
    entryId: uuid()
      .notNull()
      .references(() => inspectionEntries.id, { onDelete: 'cascade' }),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    groundKey: text().notNull(),
    rolledKm: doublePrecision().notNull(),
  },
  (t) => [primaryKey({ columns: [t.entryId, t.groundKey] }), index('entry_rolled_km_project_idx').on(t.projectId)],
);

/**
 * A counter per drive, raised by database triggers in the same transaction as any write to a
 * forecast input (layout, cutters and fittings, inspections, advance log, geology, ground types,
 * forecast settings, the project's own row); see drizzle/0013_drive-data-version-triggers.sql.
 * Derived data (the forecast cache) is valid only for the version it was computed from (decision 38).
 */
export const driveDataVersions = pgTable('drive_data_versions', {
  projectId: uuid()
    .primaryKey()
    .references(() => projects.id, { onDelete: 'cascade' }),
  version: integer().notNull().default(0),
  changedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

/**
 * The last computed forecast of a drive, shared by every server instance: the JSON answer without
 * the per-position explanations (`body`), those explanations by position id, the data version and
 * the code fingerprint it was computed from, and when.
 */
export const forecastCache = pgTable('forecast_cache', {
  projectId: uuid()
    .primaryKey()
    .references(() => projects.id, { onDelete: 'cascade' }),
  dataVersion: integer().notNull(),
  codeVersion: text().notNull(),
  computedAt: timestamp({ withTimezone: true }).notNull(),
  body: text().notNull(),
  explanations: jsonb().$type<Record<string, unknown>>().notNull(),
});

/** The planner's settings for wear fits and forecasts, one row per project (defaults until saved). */
export const forecastSettings = pgTable('forecast_settings', {
  projectId: uuid()
    .primaryKey()
    .references(() => projects.id, { onDelete: 'cascade' }),
  /** Wear multiplier per position class relative to face discs (face = 1). */
  // Face discs are the reference: their factor is 1 (forecastSettingsInputSchema allows nothing else).
  classFactors: jsonb().$type<{ centre: number; face: 1; gauge: number }>().notNull(),
  /** Scales the Gehring prior to the site. */
  gehringSiteFactor: doublePrecision().notNull(),
  /** Weight of the prior, as an equivalent number of inspections. */
  priorStrength: doublePrecision().notNull(),
  /** Constant-section tip width of the rings, mm. */
  tipWidthMm: doublePrecision().notNull(),
  /** The shield's overcut margin on the diameter, mm: gauge wear beyond it squeezes the shield. */
  overcutMarginMm: doublePrecision().notNull(),
  /** Strokes per ground type that set the expected penetration and advance per day. */
  windowStrokes: integer().notNull(),
  /** Planner overrides per ground type id. */
  overrides: jsonb().$type<Record<string, { penetrationMmPerRev?: number; advanceMPerDay?: number }>>().notNull(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

export const stopStatusEnum = pgEnum('stop_status', ['proposed', 'scheduled', 'in_progress', 'done', 'cancelled']);

/** Crews of a project and the addresses their stop reminders go to. */
export const crews = pgTable(
  'crews',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    name: text().notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('crews_project_name_key').on(t.projectId, t.name)],
);

export const crewMembers = pgTable(
  'crew_members',
  {
    id: uuid().primaryKey().defaultRandom(),
    crewId: uuid()
      .notNull()
      .references(() => crews.id, { onDelete: 'cascade' }),
    name: text().notNull(),
    email: text().notNull(),
    /** When the crew member is also a Kerfwise user, their notification choices apply. */
    userId: uuid().references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [uniqueIndex('crew_members_crew_email_key').on(t.crewId, t.email)],
);

/** An intervention stop for cutter work: proposed → scheduled → in progress → done, or cancelled. */
export const stops = pgTable(
  'stops',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    status: stopStatusEnum().notNull().default('proposed'),
    /** 'planner' (from the plan screen) or 'job' (the nightly forecast). */
    source: text().notNull(),
    chainageM: doublePrecision().notNull(),
    ringNumber: integer(),
    compressedAir: boolean().notNull().default(false),
    /** Indicative working pressure from the water head (ρ·g·h), bar; null when no head is known. */
    workingPressureBar: doublePrecision(),
    plannedStart: timestamp({ withTimezone: true }),
    expectedHours: doublePrecision(),
    crewId: uuid().references(() => crews.id, { onDelete: 'set null' }),
    publishedAt: timestamp({ withTimezone: true }),
    actualStart: timestamp({ withTimezone: true }),
    actualEnd: timestamp({ withTimezone: true }),
    roundId: uuid().references(() => inspectionRounds.id, { onDelete: 'set null' }),
    cancelReason: text(),
    notes: text().notNull().default(''),
    createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('stops_project_idx').on(t.projectId, t.status)],
);

/** The positions a stop changes, with the wear expected when the machine gets there. */
export const stopPositions = pgTable(
  'stop_positions',
  {
    stopId: uuid()
      .notNull()
      .references(() => stops.id, { onDelete: 'cascade' }),
    positionId: uuid()
      .notNull()
      .references(() => positions.id, { onDelete: 'cascade' }),
    expectedWearMm: doublePrecision(),
  },
  (t) => [primaryKey({ columns: [t.stopId, t.positionId] })],
);

/** Reminders already sent for a stop (e.g. '24h', '2h'), so none goes out twice. */
export const stopReminders = pgTable(
  'stop_reminders',
  {
    stopId: uuid()
      .notNull()
      .references(() => stops.id, { onDelete: 'cascade' }),
    kind: text().notNull(),
    sentAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.stopId, t.kind] })],
);

/** Every run of a scheduled job: when, how it ended, and why it failed. */
export const jobRuns = pgTable(
  'job_runs',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    job: text().notNull(),
    /** 'schedule', 'catch-up' (at start-up) or 'admin'. */
    trigger: text().notNull(),
    startedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp({ withTimezone: true }),
    /** 'running', 'ok', 'failed', or 'skipped' (another instance held the lock). */
    outcome: text().notNull().default('running'),
    summary: text(),
    error: text(),
    triggeredBy: uuid().references(() => users.id, { onDelete: 'set null' }),
    /** The scheduled time a 'schedule' or 'catch-up' run stands for; null for 'run now'. */
    slotAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    index('job_runs_job_idx').on(t.job, t.startedAt),
    // One running or good run per slot: a late instance finds the slot taken (decision 19).
    uniqueIndex('job_runs_slot_key')
      .on(t.job, t.slotAt)
      .where(sql`${t.outcome} in ('running', 'ok')`),
  ],
);

/** The week a weekly digest covered for a drive: a week is sent once unless an administrator asks again. */
export const digestWeeks = pgTable(
  'digest_weeks',
  {
    digest: text().notNull(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    /** ISO week in the site's time zone, e.g. 2026-W13. */
    isoWeek: text().notNull(),
    mails: integer().notNull(),
    sentAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** How many times an administrator sent this week again. */
    resent: integer().notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.digest, t.projectId, t.isoWeek] })],
);

/** Which notifications a user turned off (everything is on until turned off). */
export const notificationOptOuts = pgTable(
  'notification_opt_outs',
  {
    userId: uuid()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    kind: text().notNull(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.kind] })],
);

export const partKinds = ['ring', 'bearing-kit', 'seal-kit', 'cutter-assembly', 'hub', 'small-part'] as const;
export const partKindEnum = pgEnum('part_kind', partKinds);

/** The parts catalogue of a drive. */
export const parts = pgTable(
  'parts',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    code: text().notNull(),
    name: text().notNull(),
    kind: partKindEnum().notNull(),
    discSizeIn: doublePrecision(),
    unitCost: numeric({ precision: 12, scale: 2 }).notNull(),
    currency: text().notNull().default('EUR'),
    supplier: text().notNull().default(''),
    leadTimeMeanDays: doublePrecision().notNull(),
    leadTimeSdDays: doublePrecision().notNull().default(0),
    minOrderQty: integer().notNull().default(1),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('parts_project_code_key').on(t.projectId, t.code)],
);

/** Every change of stock on hand: counts (adjustments), receipts, issues to the workshop. */
export const stockMovements = pgTable(
  'stock_movements',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    partId: uuid()
      .notNull()
      .references(() => parts.id, { onDelete: 'cascade' }),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** Signed quantity. */
    qty: integer().notNull(),
    /** 'count', 'receipt', 'issue', 'rebuild', 'scrap'. */
    kind: text().notNull(),
    note: text().notNull().default(''),
    purchaseOrderLineId: uuid(),
    userId: uuid().references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [index('stock_movements_part_idx').on(t.partId, t.at)],
);

export const purchaseOrders = pgTable(
  'purchase_orders',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    number: text().notNull(),
    supplier: text().notNull().default(''),
    orderedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    note: text().notNull().default(''),
    createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [uniqueIndex('purchase_orders_project_number_key').on(t.projectId, t.number)],
);

export const purchaseOrderLines = pgTable(
  'purchase_order_lines',
  {
    id: uuid().primaryKey().defaultRandom(),
    purchaseOrderId: uuid()
      .notNull()
      .references(() => purchaseOrders.id, { onDelete: 'cascade' }),
    partId: uuid()
      .notNull()
      .references(() => parts.id),
    qtyOrdered: integer().notNull(),
    qtyReceived: integer().notNull().default(0),
    dueDate: date().notNull(),
  },
  (t) => [index('purchase_order_lines_po_idx').on(t.purchaseOrderId)],
);

/**
 * The workshop loop of a drive: what a removed cutter needs to come back, by its worst condition
 * (bill of materials per condition, or 'scrap'), the turnaround and the most rebuilds allowed.
 */
export const workshopSettings = pgTable('workshop_settings', {
  projectId: uuid()
    .primaryKey()
    .references(() => projects.id, { onDelete: 'cascade' }),
  turnaroundDays: doublePrecision().notNull(),
  maxRebuilds: integer().notNull(),
  /** condition key → [{ partId, qty }] or 'scrap'; per cutter assembly part. */
  boms: jsonb().$type<Record<string, Record<string, { partId: string; qty: number }[] | 'scrap'>>>().notNull(),
  serviceLevel: doublePrecision().notNull().default(0.95),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

/** The drive's list of downtime causes (editable); `cutterWork` marks inspection/change time. */
export const downtimeCauses = pgTable(
  'downtime_causes',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    name: text().notNull(),
    cutterWork: boolean().notNull().default(false),
    sortOrder: integer().notNull().default(0),
    active: boolean().notNull().default(true),
  },
  (t) => [uniqueIndex('downtime_causes_project_name_key').on(t.projectId, t.name)],
);

/** A standstill of the machine with its cause; entered by hand or proposed from gaps in the log. */
export const downtimeEvents = pgTable(
  'downtime_events',
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid()
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    startAt: timestamp({ withTimezone: true }).notNull(),
    endAt: timestamp({ withTimezone: true }).notNull(),
    causeId: uuid().references(() => downtimeCauses.id),
    note: text().notNull().default(''),
    stopId: uuid().references(() => stops.id, { onDelete: 'set null' }),
    /** 'manual' or 'gap' (proposed from the advance log, cause still to give). */
    source: text().notNull().default('manual'),
    createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('downtime_events_project_idx').on(t.projectId, t.startAt)],
);

/** Site settings for the site manager's reports: shift pattern and labour rate. */
export const siteSettings = pgTable('site_settings', {
  projectId: uuid()
    .primaryKey()
    .references(() => projects.id, { onDelete: 'cascade' }),
  /** Shift starts in site-local time, e.g. [{ name: 'Day', start: '06:00' }, { name: 'Night', start: '18:00' }]. */
  shifts: jsonb().$type<{ name: string; start: string }[]>().notNull(),
  labourRatePerHour: numeric({ precision: 10, scale: 2 }).notNull(),
  /** Gaps between strokes longer than this (minutes) are proposed as downtime. */
  gapMinutes: integer().notNull().default(90),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});
