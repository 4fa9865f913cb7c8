import { and, asc, desc, eq, sql } from 'drizzle-orm';
import { Router } from 'express';
import { z } from 'zod';
import { projectInputSchema, projectPatchSchema } from '../../shared/schemas/project';
import { inviteUserInputSchema, membershipInputSchema, updateUserInputSchema } from '../../shared/schemas/user';
import { roleLabels } from '../../shared/roles';
import {
  ADMIN_MAIL_LIMIT,
  adminMailQuerySchema,
  type AdminMail,
  type AdminMailView,
  type AdminMember,
  type AdminMembership,
  type AdminProject,
  type AdminProjectRow,
  type AdminUser,
  type AdminUserRow,
  type JobInfo,
  type JobRunRow,
  type ReleasedMail,
} from '../../shared/schemas/admin';
import { db } from '../db/client';
import { jobRuns, memberships, outbox, projects, stops, users } from '../db/schema';
import { ensureDefaultCauses } from '../services/downtime';
import { runJob, type JobDefinition } from '../services/job-runner';
import { requireAdmin, requireUser } from '../middleware/auth';
import { appUrl } from '../lib/app-url';
import { audit } from '../lib/audit';
import { ConflictError } from '../lib/errors';
import { badRequest, conflict, notFound } from '../lib/http-error';
import { enqueueMail, kickMailDelivery, releaseUncertainMail, UNCERTAIN_AFTER_MINUTES } from '../lib/mail';
import { issueToken } from '../lib/one-time-token';
import { reply } from '../lib/reply';
import { revokeAllSessions } from '../lib/session';
import { authChangesDelivered } from '../lib/session-cache';

export const adminRouter = Router();
adminRouter.use(requireAdmin);

const userIdParams = z.object({ userId: z.uuid({ message: 'That user id is not valid.' }) });
const projectIdParams = z.object({ projectId: z.uuid({ message: 'That project id is not valid.' }) });
const memberParams = projectIdParams.extend(userIdParams.shape);

const publicUser = {
  id: users.id,
  email: users.email,
  name: users.name,
  isAdmin: users.isAdmin,
  active: users.active,
  invited: sql<boolean>`${users.passwordHash} is null`,
};

adminRouter.get('/users', async (_req, res) => {
  const list = await db.select(publicUser).from(users).orderBy(asc(users.name));
  const roles = await db
    .select({ userId: memberships.userId, projectId: memberships.projectId, projectName: projects.name, role: memberships.role })
    .from(memberships)
    .innerJoin(projects, eq(projects.id, memberships.projectId));
  reply<AdminUser[]>(
    res,
    200,
    list.map((u) => ({ ...u, memberships: roles.filter((r) => r.userId === u.id) })),
  );
});

/** Invites a person: the account exists at once, and they choose their password from the e-mailed link. */
adminRouter.post('/users', async (req, res) => {
  const me = requireUser(req);
  const input = inviteUserInputSchema.parse(req.body);
  const created = await db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, input.email)).limit(1);
    if (existing) throw conflict('A user with that e-mail address already exists.');
    const [user] = await tx.insert(users).values({ email: input.email, name: input.name, isAdmin: input.isAdmin }).returning(publicUser);
    for (const m of input.memberships) {
      const [p] = await tx.select({ id: projects.id }).from(projects).where(eq(projects.id, m.projectId)).limit(1);
      if (!p) throw badRequest('One of the chosen projects does not exist.');
      await tx.insert(memberships).values({ userId: user.id, projectId: m.projectId, role: m.role });
    }
    const token = await issueToken(tx, user.id, 'invitation');
    await enqueueMail(tx, {
      kind: 'invitation',
      about: { userId: user.id },
      to: [user.email],
      subject: 'You are invited to Kerfwise',
      text: `Hello ${user.name},\n\n${me.name} has invited you to Kerfwise, where the cutter crews, planner, buyer and site manager of a TBM drive keep track of disc cutters and stops.\n\nChoose your password here (the link works once, for 7 days):\n\n${appUrl()}/set-password?token=${token}\n`,
    });
    await audit(tx, { userId: me.id, entity: 'user', entityId: user.id, action: 'invite', after: { ...input } });
    return user;
  });
  kickMailDelivery();
  reply<AdminUserRow>(res, 201, created);
});

adminRouter.patch('/users/:userId', async (req, res) => {
  const me = requireUser(req);
  const { userId } = userIdParams.parse(req.params);
  const input = updateUserInputSchema.parse(req.body);
  if (userId === me.id && (input.active === false || input.isAdmin === false)) {
    throw badRequest('You cannot deactivate yourself or remove your own administrator rights; ask another administrator.');
  }
  const updated = await db.transaction(async (tx) => {
    const [before] = await tx.select(publicUser).from(users).where(eq(users.id, userId)).limit(1);
    if (!before) throw notFound('That user');
    const [after] = await tx
      .update(users)
      .set({ ...input, updatedAt: sql`now()` })
      .where(eq(users.id, userId))
      .returning(publicUser);
    if (input.active === false) await revokeAllSessions(tx, userId);
    await audit(tx, { userId: me.id, entity: 'user', entityId: userId, action: 'update', before, after });
    return after;
  });
  await authChangesDelivered();
  reply<AdminUserRow>(res, 200, updated);
});

adminRouter.get('/projects', async (_req, res) => {
  const rows = await db
    .select({ project: projects, members: sql<number>`(select count(*)::int from memberships m where m.project_id = projects.id)` })
    .from(projects)
    .orderBy(asc(projects.name));
  reply<AdminProject[]>(
    res,
    200,
    rows.map((r) => ({ ...r.project, memberCount: r.members })),
  );
});

adminRouter.post('/projects', async (req, res) => {
  const me = requireUser(req);
  const input = projectInputSchema.parse(req.body);
  const project = await db.transaction(async (tx) => {
    const [dup] = await tx.select({ id: projects.id }).from(projects).where(eq(projects.name, input.name)).limit(1);
    if (dup) throw conflict('A project with that name already exists.');
    const [p] = await tx.insert(projects).values(input).returning();
    await audit(tx, { userId: me.id, projectId: p.id, entity: 'project', entityId: p.id, action: 'create', after: p });
    // The causes come with the project, so that no read ever has to write them.
    await ensureDefaultCauses(tx, p.id, me.id);
    return p;
  });
  reply<AdminProjectRow>(res, 201, project);
});

adminRouter.patch('/projects/:projectId', async (req, res) => {
  const me = requireUser(req);
  const { projectId } = projectIdParams.parse(req.params);
  const input = projectPatchSchema.parse(req.body);
  const project = await db.transaction(async (tx) => {
    const [before] = await tx.select().from(projects).where(eq(projects.id, projectId)).limit(1);
    if (!before) throw notFound('That project');
    const [after] = await tx
      .update(projects)
      .set({ ...input, updatedAt: sql`now()` })
      .where(eq(projects.id, projectId))
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'project', entityId: projectId, action: 'update', before, after });
    return after;
  });
  await authChangesDelivered();
  reply<AdminProjectRow>(res, 200, project);
});

adminRouter.get('/projects/:projectId/members', async (req, res) => {
  const { projectId } = projectIdParams.parse(req.params);
  const rows = await db
    .select({ userId: users.id, name: users.name, email: users.email, active: users.active, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.projectId, projectId))
    .orderBy(asc(users.name));
  reply<AdminMember[]>(res, 200, rows);
});

/** Adds a person to a project or changes their role there. */
adminRouter.put('/projects/:projectId/members/:userId', async (req, res) => {
  const me = requireUser(req);
  const { projectId, userId } = memberParams.parse(req.params);
  const { role } = membershipInputSchema.parse(req.body);
  const saved = await db.transaction(async (tx) => {
    const [p] = await tx.select({ id: projects.id }).from(projects).where(eq(projects.id, projectId)).limit(1);
    const [u] = await tx.select({ id: users.id }).from(users).where(eq(users.id, userId)).limit(1);
    if (!p) throw notFound('That project');
    if (!u) throw notFound('That user');
    const [before] = await tx
      .select()
      .from(memberships)
      .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId)))
      .limit(1);
    const [after] = await tx
      .insert(memberships)
      .values({ projectId, userId, role })
      .onConflictDoUpdate({ target: [memberships.userId, memberships.projectId], set: { role } })
      .returning();
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'membership',
      entityId: after.id,
      action: before ? 'update' : 'create',
      before: before ?? null,
      after,
    });
    return after;
  });
  await authChangesDelivered();
  reply<AdminMembership>(res, 200, { ...saved, roleLabel: roleLabels[saved.role] });
});

adminRouter.delete('/projects/:projectId/members/:userId', async (req, res) => {
  const me = requireUser(req);
  const { projectId, userId } = memberParams.parse(req.params);
  await db.transaction(async (tx) => {
    const [before] = await tx
      .delete(memberships)
      .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId)))
      .returning();
    if (!before) throw notFound('That membership');
    await audit(tx, { userId: me.id, projectId, entity: 'membership', entityId: before.id, action: 'delete', before });
  });
  await authChangesDelivered();
  res.status(204).end();
});

/**
 * The outbox, newest first: every message Kerfwise queued (whether the SMTP server is real or the
 * local catcher), filtered by kind and by (part of) a recipient's address, with the drive and the
 * stop or person each was about; the outbox's state and deliveries left uncertain beside it.
 */
adminRouter.get('/mail', async (req, res) => {
  const query = adminMailQuerySchema.parse(req.query);
  const where = and(
    query.kind ? eq(outbox.kind, query.kind) : undefined,
    // Part of an address, case-insensitive; LIKE's wildcards in the text match themselves.
    query.recipient
      ? sql`exists (select 1 from unnest(${outbox.toAddresses}) as a(address) where a.address ilike ${`%${escapeLike(query.recipient)}%`} escape '\\')`
      : undefined,
  );
  const uncertainSql = sql`${outbox.sentAt} is null and ${outbox.claimedAt} < now() - make_interval(mins => ${UNCERTAIN_AFTER_MINUTES})`;
  const rows = await db
    .select({
      mail: outbox,
      uncertain: sql<boolean>`coalesce(${uncertainSql}, false)`,
      projectName: projects.name,
      siteTimeZone: projects.siteTimeZone,
      stopChainageM: stops.chainageM,
      stopStatus: stops.status,
      userName: users.name,
      userEmail: users.email,
    })
    .from(outbox)
    .leftJoin(projects, eq(projects.id, outbox.projectId))
    .leftJoin(stops, eq(stops.id, outbox.aboutStopId))
    .leftJoin(users, eq(users.id, outbox.aboutUserId))
    .where(where)
    .orderBy(desc(outbox.createdAt), desc(outbox.id))
    .limit(ADMIN_MAIL_LIMIT);
  const [{ matching }] = await db
    .select({ matching: sql<number>`count(*)::int` })
    .from(outbox)
    .where(where);
  const messages: AdminMail[] = rows.map((r) => ({
    id: r.mail.id,
    createdAt: r.mail.createdAt.toISOString(),
    sentAt: r.mail.sentAt?.toISOString() ?? null,
    kind: r.mail.kind,
    toAddresses: r.mail.toAddresses,
    subject: r.mail.subject,
    textBody: r.mail.textBody,
    state: r.mail.sentAt ? 'sent' : r.uncertain ? 'uncertain' : r.mail.attempts > 0 ? 'retrying' : 'waiting',
    attempts: r.mail.attempts,
    lastError: r.mail.lastError,
    project:
      r.mail.projectId && r.projectName != null && r.siteTimeZone != null
        ? { id: r.mail.projectId, name: r.projectName, siteTimeZone: r.siteTimeZone }
        : null,
    about:
      r.mail.aboutStopId && r.stopChainageM != null && r.stopStatus != null
        ? { type: 'stop', stopId: r.mail.aboutStopId, chainageM: r.stopChainageM, status: r.stopStatus }
        : r.mail.aboutUserId && r.userName != null && r.userEmail != null
          ? { type: 'user', userId: r.mail.aboutUserId, name: r.userName, email: r.userEmail }
          : null,
  }));
  const [queue] = await db
    .select({
      waiting: sql<number>`count(*) filter (where ${outbox.sentAt} is null and ${outbox.claimedAt} is null)::int`,
      failing: sql<number>`count(*) filter (where ${outbox.sentAt} is null and ${outbox.claimedAt} is null and ${outbox.attempts} > 0)::int`,
    })
    .from(outbox);
  // Claimed long ago and never marked sent: a crash mid-send; it may or may not have gone out.
  const uncertain = await db
    .select({ id: outbox.id, subject: outbox.subject, toAddresses: outbox.toAddresses, claimedAt: outbox.claimedAt })
    .from(outbox)
    .where(uncertainSql)
    .orderBy(asc(outbox.id));
  reply<AdminMailView>(res, 200, { messages, matching, outbox: queue, uncertain });
});

/** Text matched literally by LIKE/ILIKE with `escape '\\'`. */
const escapeLike = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`);

/** Sends a message of uncertain delivery again, on the administrator's decision. */
adminRouter.post('/outbox/:outboxId/release', async (req, res) => {
  const me = requireUser(req);
  const { outboxId } = z
    .object({ outboxId: z.coerce.number().int().positive({ message: 'That message id is not valid.' }) })
    .parse(req.params);
  if (!(await releaseUncertainMail(outboxId))) throw notFound('That message of uncertain delivery');
  await audit(db, { userId: me.id, entity: 'outbox', entityId: String(outboxId), action: 'release' });
  kickMailDelivery();
  reply<ReleasedMail>(res, 202, { released: outboxId });
});

/**
 * The scheduled jobs, mounted at /admin/jobs. `jobs` is the registry the app was built with
 * (jobs/index.ts in the entries, whatever a test passes): the server never imports jobs/ itself.
 */
export function createAdminJobsRouter(jobs: readonly JobDefinition[]) {
  const adminJobsRouter = Router();
  adminJobsRouter.use(requireAdmin);

  /** The scheduled jobs with their last runs (newest first). */
  adminJobsRouter.get('/', async (_req, res) => {
    const runs = await db.select().from(jobRuns).orderBy(desc(jobRuns.startedAt)).limit(300);
    reply<JobInfo[]>(
      res,
      200,
      jobs.map((j) => ({ name: j.name, label: j.label, cron: j.cron, runs: runs.filter((r) => r.job === j.name).slice(0, 20) })),
    );
  });

  /**
   * Runs a job now (under the same lock as the schedule) and answers with the recorded run. A weekly
   * digest whose week was already sent answers 409 with `confirmAgain: true` unless `?again=true`.
   */
  adminJobsRouter.post('/:name/run', async (req, res) => {
    const me = requireUser(req);
    const { name } = z.object({ name: z.string().max(60) }).parse(req.params);
    const { again } = runNowQuerySchema.parse(req.query);
    const job = jobs.find((j) => j.name === name);
    if (!job) throw notFound('That job');
    const now = new Date();
    const sentBefore = !again && job.alreadyDone ? await job.alreadyDone({ now }) : null;
    if (sentBefore) throw new ConflictError(sentBefore, [], { confirmAgain: true });
    reply<JobRunRow>(res, 200, await runJob(job, 'admin', { userId: me.id, now, again }));
  });
  return adminJobsRouter;
}

const runNowQuerySchema = z.object({
  again: z
    .enum(['true', 'false'], { message: 'again must be true or false' })
    .optional()
    .transform((v) => v === 'true'),
});
