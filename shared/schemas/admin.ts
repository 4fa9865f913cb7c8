/** What the administration routes answer (server/routes/admin.ts), typed once for server and client. */
import { z } from 'zod';
import { notificationKinds } from '../notifications';
import type { ProjectRole } from '../roles';
import { EMAIL_MAX, singleLine } from './fields';
import type { Project } from './project';

export interface AdminUser {
  id: string;
  email: string;
  name: string;
  isAdmin: boolean;
  active: boolean;
  invited: boolean;
  memberships: { projectId: string; projectName: string; role: ProjectRole }[];
}

/** A drive as the administration lists it: the project without the caller's role, with its member count. */
export interface AdminProject extends Omit<Project, 'role' | 'units'> {
  memberCount: number;
}

export interface CaughtMail {
  id: number;
  receivedAt: string;
  fromAddress: string;
  toAddresses: string[];
  subject: string;
  textBody: string;
}

export interface JobRunRow {
  id: number;
  job: string;
  trigger: string;
  startedAt: string;
  finishedAt: string | null;
  outcome: string;
  summary: string | null;
  error: string | null;
}

export interface JobInfo {
  name: string;
  label: string;
  cron: string;
  runs: JobRunRow[];
}

/** Every kind of mail Kerfwise sends, with what Admin → Mail calls it. */
export const mailKinds = [
  ...notificationKinds.map((k) => ({ key: k.key as string, label: k.label })),
  { key: 'invitation', label: 'Invitation to Kerfwise' },
  { key: 'password_reset', label: 'Password reset link' },
  { key: 'backup_alert', label: 'Backup alert' },
] as const;
export const mailKindKeys = mailKinds.map((k) => k.key) as [string, ...string[]];
export const mailKindLabel = (key: string) => mailKinds.find((k) => k.key === key)?.label ?? key;

/** The most messages Admin → Mail lists at once (the newest). */
export const ADMIN_MAIL_LIMIT = 200;

/** GET /api/admin/mail?kind=&recipient= : both optional; an empty field is no filter. */
export const adminMailQuerySchema = z.object({
  kind: z
    .enum(['', ...mailKindKeys], { message: `The kind of mail must be one of: ${mailKindKeys.join(', ')}.` })
    .optional()
    .transform((v) => v || undefined),
  recipient: singleLine('The recipient', EMAIL_MAX, 'The recipient must be (part of) an e-mail address on one line.')
    .optional()
    .transform((v) => v?.trim() || undefined),
});
export type AdminMailQuery = z.input<typeof adminMailQuerySchema>;

/** What a message was about: a stop (published, proposed, reminder) or a person (invitation, reset). */
export type MailAbout =
  { type: 'stop'; stopId: string; chainageM: number; status: string } | { type: 'user'; userId: string; name: string; email: string };

/** One message of the outbox as Admin → Mail lists it (newest first). */
export interface AdminMail {
  id: number;
  createdAt: string;
  sentAt: string | null;
  kind: string;
  toAddresses: string[];
  subject: string;
  textBody: string;
  /** sent; waiting (not tried yet); retrying (a try failed); uncertain (a send was interrupted). */
  state: 'sent' | 'waiting' | 'retrying' | 'uncertain';
  attempts: number;
  lastError: string | null;
  /** The drive the message belongs to, with its site zone (times show in it); none for installation mail. */
  project: { id: string; name: string; siteTimeZone: string } | null;
  about: MailAbout | null;
}

/** GET /api/admin/mail: the outbox's messages (filtered, newest first), its state and deliveries left uncertain by a crash. */
export interface AdminMailView {
  messages: AdminMail[];
  /** Messages matching the filters (the list shows at most ADMIN_MAIL_LIMIT of them). */
  matching: number;
  outbox: { waiting: number; failing: number };
  /** `claimedAt` is never null here (the query asks for claimed rows); the column allows null. */
  uncertain: { id: number; subject: string; toAddresses: string[]; claimedAt: string | null }[];
}

/** GET /api/admin/projects/:projectId/members. */
export interface AdminMember {
  userId: string;
  name: string;
  email: string;
  role: ProjectRole;
}

/** POST and PATCH /api/admin/users: the user as saved (without memberships). */
export type AdminUserRow = Omit<AdminUser, 'memberships'>;

/** POST and PATCH /api/admin/projects: the project as saved (without the member count). */
export type AdminProjectRow = Omit<AdminProject, 'memberCount'>;

/** PUT /api/admin/projects/:projectId/members/:userId: the membership as saved, with its role's label. */
export interface AdminMembership {
  id: string;
  userId: string;
  projectId: string;
  role: ProjectRole;
  roleLabel: string;
}

/** POST /api/admin/outbox/:outboxId/release (202). */
export interface ReleasedMail {
  released: number;
}

/** GET /api/admin/backups/status: the last good backup, a failure since, and whether one is missing. */
export interface BackupStatus {
  missing: boolean;
  missingAfterHours: number;
  lastGood: { at: string; summary: string | null } | null;
  failedSince: { at: string; error: string | null } | null;
  backupDir: string;
  onDisk: number;
  newestOnDisk: string | null;
}
