/** What the administration routes answer (server/routes/admin.ts), typed once for server and client. */
import type { ProjectRole } from '../roles';
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

/** GET /api/admin/mail: caught mail, the outbox's state and deliveries left uncertain by a crash. */
export interface AdminMailView {
  caught: CaughtMail[];
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
