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
  uncertain: { id: number; subject: string; toAddresses: string[]; claimedAt: string }[];
}

/** GET /api/admin/projects/:projectId/members. */
export interface AdminMember {
  userId: string;
  name: string;
  email: string;
  role: ProjectRole;
}
