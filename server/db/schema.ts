import { sql } from 'drizzle-orm';
import {
  bigserial, boolean, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid,
} from 'drizzle-orm/pg-core';
import { projectRoles } from '../../shared/roles';

const createdAt = () => timestamp({ withTimezone: true }).notNull().defaultNow();

export const projectRoleEnum = pgEnum('project_role', projectRoles);
export const driveDirectionEnum = pgEnum('drive_direction', ['increasing', 'decreasing']);
export const tokenPurposeEnum = pgEnum('token_purpose', ['password_reset', 'invitation']);

export const users = pgTable('users', {
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
}, (t) => [uniqueIndex('users_email_key').on(t.email)]);

/** One project is one TBM drive. */
export const projects = pgTable('projects', {
  id: uuid().primaryKey().defaultRandom(),
  name: text().notNull(),
  machineDescription: text().notNull().default(''),
  excavatedDiameterM: doublePrecision().notNull(),
  startChainageM: doublePrecision().notNull().default(0),
  /** Whether chainage increases or decreases as the machine advances. */
  driveDirection: driveDirectionEnum().notNull().default('increasing'),
  siteTimeZone: text().notNull(),
  units: text().notNull().default('metric'),
  createdAt: createdAt(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
}, (t) => [uniqueIndex('projects_name_key').on(t.name)]);

export const memberships = pgTable('memberships', {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  role: projectRoleEnum().notNull(),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('memberships_user_project_key').on(t.userId, t.projectId), index('memberships_project_idx').on(t.projectId)]);

/** Server-side session rows, so sign-out, deactivation and password change can revoke a signed token. */
export const sessions = pgTable('sessions', {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  createdAt: createdAt(),
  expiresAt: timestamp({ withTimezone: true }).notNull(),
  revokedAt: timestamp({ withTimezone: true }),
  userAgent: text(),
  ip: text(),
}, (t) => [index('sessions_user_idx').on(t.userId)]);

/** Who changed which record of the field, when, and what it was before and after. */
export const auditLog = pgTable('audit_log', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  at: timestamp({ withTimezone: true }).notNull().defaultNow(),
  userId: uuid().references(() => users.id, { onDelete: 'set null' }),
  projectId: uuid().references(() => projects.id, { onDelete: 'cascade' }),
  entity: text().notNull(),
  entityId: text().notNull(),
  action: text().notNull(),
  before: jsonb(),
  after: jsonb(),
}, (t) => [index('audit_log_entity_idx').on(t.entity, t.entityId), index('audit_log_project_idx').on(t.projectId, t.at)]);

/** One-time links (password reset, invitation). Only a SHA-256 of the token is stored. */
export const oneTimeTokens = pgTable('one_time_tokens', {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  purpose: tokenPurposeEnum().notNull(),
  tokenHash: text().notNull(),
  expiresAt: timestamp({ withTimezone: true }).notNull(),
  usedAt: timestamp({ withTimezone: true }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('one_time_tokens_hash_key').on(t.tokenHash)]);

/** Sign-in attempts, kept in the database so rate limits hold across several server instances. */
export const signInAttempts = pgTable('sign_in_attempts', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  at: timestamp({ withTimezone: true }).notNull().defaultNow(),
  email: text().notNull(),
  ip: text().notNull(),
  succeeded: boolean().notNull(),
}, (t) => [index('sign_in_attempts_email_idx').on(t.email, t.at), index('sign_in_attempts_ip_idx').on(t.ip, t.at)]);

/** Mail waits here, written in the same transaction as the change that caused it, until sent. */
export const outbox = pgTable('outbox', {
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
  lastError: text(),
}, (t) => [index('outbox_pending_idx').on(t.nextAttemptAt).where(sql`sent_at is null`)]);

/** Mail caught by the local fake SMTP server (development, demo, tests). */
export const caughtMail = pgTable('caught_mail', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  fromAddress: text().notNull(),
  toAddresses: text().array().notNull(),
  subject: text().notNull(),
  textBody: text().notNull(),
  htmlBody: text(),
}, (t) => [index('caught_mail_received_idx').on(t.receivedAt)]);
