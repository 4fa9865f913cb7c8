import { and, eq, inArray } from 'drizzle-orm';
import { Router, type Request } from 'express';
import {
  cancelStopInputSchema,
  canStop,
  completeStopInputSchema,
  createStopInputSchema,
  scheduleStopInputSchema,
  startStopInputSchema,
  stopListQuerySchema,
  stopPlanQuerySchema,
  type StopAction,
  type StopListItem,
  type StopPlanView,
  type WorkPack as WorkPackAnswer,
} from '../../shared/schemas/stop';
import { formatChainage } from '../../shared/domain/chainage';
import { workPackText } from '../../shared/domain/work-pack';
import { formatSiteDateTime } from '../../shared/site-time';
import { db, type DbOrTx } from '../db/client';
import { crews, inspectionRounds, positions, projects, stopPositions, stopReminders, stops } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { appUrl } from '../lib/app-url';
import { audit } from '../lib/audit';
import { badRequest, conflict, notFound } from '../lib/http-error';
import { enqueueMail, kickMailDelivery } from '../lib/mail';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { recipientsFor } from '../services/recipients';
import { describeStopPlace, listStops, loadWorkPack, planForProject, type WorkPack } from '../services/stops';

/** Intervention stops: the plan, the stops with planned against actual hours, and each stop's work pack and life. */
export const stopsRouter = Router({ mergeParams: true });

type Stop = typeof stops.$inferSelect;
type Project = typeof projects.$inferSelect;

const ids = (req: Request) => ({
  projectId: idParam(req.params, 'projectId', 'That project'),
  stopId: idParam(req.params, 'stopId', 'That stop'),
});

const pastTense: Record<StopAction, string> = {
  schedule: 'scheduled',
  publish: 'published',
  start: 'started',
  complete: 'completed',
  cancel: 'cancelled',
};

/** Why `action` cannot happen to the stop in its present state, in words that say what to do instead. */
function refusal(action: StopAction, stop: Stop, timeZone: string): string {
  const when = (at: Date | null) => (at ? formatSiteDateTime(at, timeZone) : 'at an unknown time');
  switch (stop.status) {
    case 'done':
      return `This stop is done (finished ${when(stop.actualEnd)}), so it cannot be ${pastTense[action]}. Propose a new stop for further work.`;
    case 'cancelled':
      return `This stop was cancelled (${stop.cancelReason}), so it cannot be ${pastTense[action]}. Propose a new stop instead.`;
    case 'in_progress':
      return action === 'start'
        ? `This stop is already in progress (started ${when(stop.actualStart)}).`
        : `This stop is in progress (started ${when(stop.actualStart)}): complete it when the work is finished, or cancel it with a reason.`;
    case 'proposed':
      return `This stop is only proposed: schedule it (date and time, crew, expected hours)${action === 'complete' ? ' and start it' : ''} before it can be ${pastTense[action]}.`;
    case 'scheduled':
      return 'This stop has not started yet: start it when work begins, then complete it.';
  }
}

/** The stop and its project, the stop row locked for the rest of the transaction; 409 when `action` does not fit its state. */
async function lockStop(tx: DbOrTx, projectId: string, stopId: string, action: StopAction): Promise<{ stop: Stop; project: Project }> {
  const [stop] = await tx
    .select()
    .from(stops)
    .where(and(eq(stops.id, stopId), eq(stops.projectId, projectId)))
    .for('update');
  if (!stop) throw notFound('That stop');
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
  if (!canStop(action, stop.status)) throw conflict(refusal(action, stop, project.siteTimeZone));
  return { stop, project };
}

/** Mail to the stop's crew members who have not turned `stop_published` off; how many were queued. */
async function mailCrew(tx: DbOrTx, project: Project, pack: WorkPack, subject: string, text: string): Promise<string[]> {
  const to = (await recipientsFor(tx, project.id, 'stop_published', { crewId: pack.crew?.id })).map((r) => r.email);
  // One message per member: crew members do not see each other's addresses.
  for (const address of to)
    await enqueueMail(tx, { kind: 'stop_published', projectId: project.id, about: { stopId: pack.stop.id }, to: [address], subject, text });
  return to;
}

const stopUrl = (_req: Request, projectId: string, stopId: string) => `${appUrl()}/projects/${projectId}/stops/${stopId}`;

/** The optimised plan against the hand plan over the horizon; the query may override every assumption. */
stopsRouter.get('/plan', requireProject('stops.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const overrides = stopPlanQuerySchema.parse(req.query);
  reply<StopPlanView>(res, 200, await db.transaction((tx) => planForProject(tx, projectId, new Date(), overrides)));
});

stopsRouter.get('/', requireProject('stops.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const { status } = stopListQuerySchema.parse(req.query);
  reply<StopListItem[]>(res, 200, await listStops(db, projectId, status));
});

/** A proposed stop from a stop of the plan: at an allowed chainage ahead of the machine, changing positions of this drive. */
stopsRouter.post('/', requireProject('stops.plan'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const input = createStopInputSchema.parse(req.body);
  const pack = await db.transaction(async (tx) => {
    const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
    const wanted = input.positions.map((p) => p.positionId);
    const known = new Set(
      (
        await tx
          .select({ id: positions.id })
          .from(positions)
          .where(and(eq(positions.projectId, projectId), inArray(positions.id, wanted)))
      ).map((p) => p.id),
    );
    const unknown = wanted.flatMap((id, i) =>
      known.has(id) ? [] : [{ path: `positions.${i}.positionId`, message: 'Not a position of this drive’s cutterhead.' }],
    );
    if (unknown.length > 0)
      throw badRequest(
        `${unknown.length} of the positions are not on this drive’s cutterhead. Reload the plan and propose the stop again.`,
        unknown,
      );
    const place = await describeStopPlace(tx, project, input.chainageM);
    const at = formatChainage(input.chainageM);
    if (!place.allowed)
      throw badRequest(`No stop may be made at ${at}: ${place.reason}. Choose a chainage in a section where stops are allowed.`, [
        { path: 'chainageM', message: `No stop allowed at ${at}.` },
      ]);
    if (place.machine && place.aheadM != null && place.aheadM < -1e-6) {
      throw badRequest(
        `${at} is behind the machine (now at ${formatChainage(place.machine.chainageM)}): a stop can only be made where the machine has yet to reach.`,
        [{ path: 'chainageM', message: 'Behind the machine.' }],
      );
    }
    const [same] = await tx
      .select({ id: stops.id, status: stops.status })
      .from(stops)
      .where(
        and(
          eq(stops.projectId, projectId),
          eq(stops.chainageM, input.chainageM),
          inArray(stops.status, ['proposed', 'scheduled', 'in_progress']),
        ),
      );
    if (same)
      throw conflict(
        `There is already an open stop at ${at} (${same.status.replace('_', ' ')}). Open that stop instead of proposing another.`,
      );
    const [stop] = await tx
      .insert(stops)
      .values({
        projectId,
        source: 'planner',
        status: 'proposed',
        chainageM: input.chainageM,
        ringNumber: place.ringNumber,
        compressedAir: input.compressedAir,
        workingPressureBar: place.workingPressureBar,
        expectedHours: input.expectedHours,
        notes: input.notes,
        createdBy: me.id,
      })
      .returning();
    await tx
      .insert(stopPositions)
      .values(input.positions.map((p) => ({ stopId: stop.id, positionId: p.positionId, expectedWearMm: p.expectedWearMm })));
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'stop',
      entityId: stop.id,
      action: 'create',
      after: { ...stop, positions: input.positions },
    });
    return loadWorkPack(tx, projectId, stop.id);
  });
  reply<WorkPackAnswer>(res, 201, pack);
});

/** The stop and its work pack. */
stopsRouter.get('/:stopId', requireProject('stops.read'), async (req, res) => {
  const { projectId, stopId } = ids(req);
  reply<WorkPackAnswer>(res, 200, await loadWorkPack(db, projectId, stopId));
});

/** Date and time, crew, expected hours, free or compressed air. A change after publishing needs a new publish (and new reminders). */
stopsRouter.post('/:stopId/schedule', requireProject('stops.plan'), async (req, res) => {
  const { projectId, stopId } = ids(req);
  const me = requireUser(req);
  const input = scheduleStopInputSchema.parse(req.body);
  const pack = await db.transaction(async (tx) => {
    const { stop: before } = await lockStop(tx, projectId, stopId, 'schedule');
    const [crew] = await tx
      .select({ id: crews.id })
      .from(crews)
      .where(and(eq(crews.id, input.crewId), eq(crews.projectId, projectId)));
    if (!crew)
      throw badRequest('That crew is not a crew of this drive. Choose one from the list.', [
        { path: 'crewId', message: 'Not a crew of this drive.' },
      ]);
    const plannedStart = new Date(input.plannedStart);
    const changed =
      before.plannedStart?.getTime() !== plannedStart.getTime() ||
      before.crewId !== input.crewId ||
      before.expectedHours !== input.expectedHours ||
      before.compressedAir !== input.compressedAir;
    const [after] = await tx
      .update(stops)
      .set({
        status: 'scheduled',
        plannedStart,
        expectedHours: input.expectedHours,
        crewId: input.crewId,
        compressedAir: input.compressedAir,
        updatedAt: new Date(),
        ...(changed ? { publishedAt: null } : {}),
      })
      .where(eq(stops.id, stopId))
      .returning();
    // Reminders already sent were for the old schedule.
    if (changed) await tx.delete(stopReminders).where(eq(stopReminders.stopId, stopId));
    await audit(tx, { userId: me.id, projectId, entity: 'stop', entityId: stopId, action: 'schedule', before, after });
    return loadWorkPack(tx, projectId, stopId);
  });
  reply<WorkPackAnswer>(res, 200, pack);
});

/** Publishes a scheduled stop: every crew member gets the work pack and the cautions by e-mail (outbox, same transaction). */
stopsRouter.post('/:stopId/publish', requireProject('stops.plan'), async (req, res) => {
  const { projectId, stopId } = ids(req);
  const me = requireUser(req);
  const pack = await db.transaction(async (tx) => {
    const { stop: before, project } = await lockStop(tx, projectId, stopId, 'publish');
    if (before.publishedAt) {
      throw conflict(
        `This stop was already published on ${formatSiteDateTime(before.publishedAt, project.siteTimeZone)}; the crew has the work pack. Change its schedule to publish it again.`,
      );
    }
    const draft = await loadWorkPack(tx, projectId, stopId);
    if (!draft.crew) throw conflict('This stop has no crew (the crew may have been removed). Schedule it with a crew, then publish it.');
    if (draft.crew.members.length === 0)
      throw conflict(`${draft.crew.name} has no members to tell. Ask the administrator to add the crew’s e-mail addresses, then publish.`);
    const [after] = await tx.update(stops).set({ publishedAt: new Date(), updatedAt: new Date() }).where(eq(stops.id, stopId)).returning();
    const published = await loadWorkPack(tx, projectId, stopId);
    const when = after.plannedStart ? formatSiteDateTime(after.plannedStart, project.siteTimeZone, { withZone: true }) : '';
    const to = await mailCrew(
      tx,
      project,
      published,
      `${project.name}: cutter stop at ${formatChainage(after.chainageM)}, ${when}`,
      `You are on the crew of this intervention stop.\n\n${workPackText(published, project, stopUrl(req, projectId, stopId))}`,
    );
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'stop',
      entityId: stopId,
      action: 'publish',
      before,
      after: { ...after, mailedTo: to },
    });
    return published;
  });
  kickMailDelivery();
  reply<WorkPackAnswer>(res, 200, pack);
});

stopsRouter.post('/:stopId/start', requireProject('stops.run'), async (req, res) => {
  const { projectId, stopId } = ids(req);
  const me = requireUser(req);
  const input = startStopInputSchema.parse(req.body ?? {});
  const pack = await db.transaction(async (tx) => {
    const { stop: before } = await lockStop(tx, projectId, stopId, 'start');
    const actualStart = input.actualStart ? new Date(input.actualStart) : new Date();
    const [after] = await tx
      .update(stops)
      .set({ status: 'in_progress', actualStart, updatedAt: new Date() })
      .where(eq(stops.id, stopId))
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'stop', entityId: stopId, action: 'start', before, after });
    return loadWorkPack(tx, projectId, stopId);
  });
  reply<WorkPackAnswer>(res, 200, pack);
});

/** Finishes a stop, with the inspection round done during it if there was one. */
stopsRouter.post('/:stopId/complete', requireProject('stops.run'), async (req, res) => {
  const { projectId, stopId } = ids(req);
  const me = requireUser(req);
  const input = completeStopInputSchema.parse(req.body ?? {});
  const pack = await db.transaction(async (tx) => {
    const { stop: before, project } = await lockStop(tx, projectId, stopId, 'complete');
    if (input.roundId) {
      const [round] = await tx
        .select({ id: inspectionRounds.id })
        .from(inspectionRounds)
        .where(and(eq(inspectionRounds.id, input.roundId), eq(inspectionRounds.projectId, projectId)));
      if (!round)
        throw badRequest('That inspection round is not a round of this drive. Choose one from the list.', [
          { path: 'roundId', message: 'Not a round of this drive.' },
        ]);
    }
    const actualEnd = input.actualEnd ? new Date(input.actualEnd) : new Date();
    if (before.actualStart && actualEnd < before.actualStart) {
      throw badRequest(
        `The end is before the start (${formatSiteDateTime(before.actualStart, project.siteTimeZone)}). Check the date and time.`,
        [{ path: 'actualEnd', message: 'Before the start.' }],
      );
    }
    const [after] = await tx
      .update(stops)
      .set({ status: 'done', actualEnd, roundId: input.roundId, updatedAt: new Date() })
      .where(eq(stops.id, stopId))
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'stop', entityId: stopId, action: 'complete', before, after });
    return loadWorkPack(tx, projectId, stopId);
  });
  reply<WorkPackAnswer>(res, 200, pack);
});

/** Cancels an open stop with a reason; a crew that had the work pack is told. */
stopsRouter.post('/:stopId/cancel', requireProject('stops.plan'), async (req, res) => {
  const { projectId, stopId } = ids(req);
  const me = requireUser(req);
  const input = cancelStopInputSchema.parse(req.body);
  let mailed = false;
  const pack = await db.transaction(async (tx) => {
    const { stop: before, project } = await lockStop(tx, projectId, stopId, 'cancel');
    const [after] = await tx
      .update(stops)
      .set({ status: 'cancelled', cancelReason: input.reason, updatedAt: new Date() })
      .where(eq(stops.id, stopId))
      .returning();
    const cancelled = await loadWorkPack(tx, projectId, stopId);
    const to = before.publishedAt
      ? await mailCrew(
          tx,
          project,
          cancelled,
          `${project.name}: cutter stop at ${formatChainage(after.chainageM)} CANCELLED`,
          `The intervention stop at ${formatChainage(after.chainageM)}${before.plannedStart ? ` planned for ${formatSiteDateTime(before.plannedStart, project.siteTimeZone, { withZone: true })}` : ''} is cancelled.\n\nReason: ${input.reason}\n\n${stopUrl(req, projectId, stopId)}\n`,
        )
      : [];
    mailed = to.length > 0;
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'stop',
      entityId: stopId,
      action: 'cancel',
      before,
      after: { ...after, mailedTo: to },
    });
    return cancelled;
  });
  if (mailed) kickMailDelivery();
  reply<WorkPackAnswer>(res, 200, pack);
});
