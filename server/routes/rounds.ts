import { and, asc, desc, eq, sql } from 'drizzle-orm';
import { Router } from 'express';
import {
  entryInputSchema,
  startRoundInputSchema,
  type EntryRecorded,
  type OvertakenEntry,
  type Round,
  type RoundDetail,
  type RoundHistoryRow,
  type RoundListItem,
} from '../../shared/schemas/inspection';
import type { Sendable } from '../../shared/schemas/wire';
import { db } from '../db/client';
import { auditLog, inspectionEntries, inspectionRounds, photos, users } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { conflict, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { entryFlags, recordEntry, startRoundOnce } from '../services/inspections';
import { listPositions } from '../services/positions';

export const roundsRouter = Router({ mergeParams: true });

roundsRouter.get('/', requireProject('rounds.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const rows = await db
    .select({
      round: inspectionRounds,
      entries: sql<number>`(select count(*)::int from inspection_entries e where e.round_id = inspection_rounds.id)`,
      changes: sql<number>`(select count(*)::int from inspection_entries e where e.round_id = inspection_rounds.id and e.action = 'changed')`,
    })
    .from(inspectionRounds)
    .where(eq(inspectionRounds.projectId, projectId))
    .orderBy(desc(inspectionRounds.startedAt));
  reply<RoundListItem[]>(
    res,
    200,
    rows.map((r) => ({ ...r.round, entryCount: r.entries, changeCount: r.changes })),
  );
});

roundsRouter.post('/', requireProject('rounds.record'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const input = startRoundInputSchema.parse(req.body);
  const { round, replayed } = await db.transaction((tx) => startRoundOnce(tx, projectId, requireUser(req).id, input));
  reply<Round>(res, replayed ? 200 : 201, round);
});

/**
 * The caller's entries overtaken by another fitter's later-recorded entry for the same position
 * and round, in either arrival order (decision 42), newest first.
 */
roundsRouter.get('/overtaken', requireProject('rounds.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const rows = await db
    .select({
      id: auditLog.id,
      roundId: sql<string>`${auditLog.after}->>'roundId'`,
      positionId: sql<string>`${auditLog.after}->>'positionId'`,
      // The entry that stands names its fitter in both arrival orders (`after.recordedBy`).
      byName: users.name,
      at: auditLog.at,
    })
    .from(auditLog)
    .leftJoin(users, sql`${users.id}::text = ${auditLog.after}->>'recordedBy'`)
    .where(
      and(
        eq(auditLog.projectId, projectId),
        eq(auditLog.entity, 'inspection_entry'),
        eq(auditLog.action, 'overtaken'),
        sql`${auditLog.before}->>'recordedBy' = ${me.id}`,
      ),
    )
    .orderBy(desc(auditLog.at))
    .limit(200);
  reply<OvertakenEntry[]>(res, 200, rows);
});

/** The round with every position, what was recorded for each, and the walking order of the last round. */
roundsRouter.get('/:roundId', requireProject('rounds.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const roundId = idParam(req.params, 'roundId', 'That inspection round');
  const [round] = await db
    .select()
    .from(inspectionRounds)
    .where(and(eq(inspectionRounds.id, roundId), eq(inspectionRounds.projectId, projectId)));
  if (!round) throw notFound('That inspection round');
  const positionList = await listPositions(projectId);
  const limits = new Map(positionList.map((p) => [p.id, p.wearLimitMm]));
  const entries = await db
    .select()
    .from(inspectionEntries)
    .where(eq(inspectionEntries.roundId, roundId))
    .orderBy(asc(inspectionEntries.recordedAt));
  const photoRows = await db
    .select({ id: photos.id, entryId: photos.entryId })
    .from(photos)
    .innerJoin(inspectionEntries, eq(inspectionEntries.id, photos.entryId))
    .where(eq(inspectionEntries.roundId, roundId));
  const [previous] = await db
    .select({ id: inspectionRounds.id })
    .from(inspectionRounds)
    .where(and(eq(inspectionRounds.projectId, projectId), sql`${inspectionRounds.startedAt} < ${round.startedAt}`))
    .orderBy(desc(inspectionRounds.startedAt))
    .limit(1);
  const lastOrder = previous
    ? (
        await db
          .select({ positionId: inspectionEntries.positionId })
          .from(inspectionEntries)
          .where(eq(inspectionEntries.roundId, previous.id))
          .orderBy(asc(inspectionEntries.recordedAt))
      ).map((r) => r.positionId)
    : [];
  reply<RoundDetail>(res, 200, {
    round,
    positions: positionList,
    entries: entries.map((e) => ({
      ...e,
      ...entryFlags(e, limits.get(e.positionId) ?? Infinity),
      photoIds: photoRows.filter((p) => p.entryId === e.id).map((p) => p.id),
    })),
    lastRoundOrder: lastOrder,
  });
});

/** One position's entry. Idempotent on clientKey: a queued entry sent again answers 200 and stores nothing new. */
roundsRouter.post('/:roundId/entries', requireProject('rounds.record'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const roundId = idParam(req.params, 'roundId', 'That inspection round');
  const input = entryInputSchema.parse(req.body);
  const result = await db.transaction((tx) => recordEntry(tx, projectId, roundId, requireUser(req).id, input));
  reply<EntryRecorded>(res, result.replayed ? 200 : 201, result);
});

roundsRouter.post('/:roundId/close', requireProject('rounds.record'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const roundId = idParam(req.params, 'roundId', 'That inspection round');
  const me = requireUser(req);
  const round = await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(inspectionRounds)
      .where(and(eq(inspectionRounds.id, roundId), eq(inspectionRounds.projectId, projectId)))
      .for('update');
    if (!before) throw notFound('That inspection round');
    if (before.closedAt) throw conflict('This round is already closed.');
    const [after] = await tx
      .update(inspectionRounds)
      .set({ closedAt: sql`now()` })
      .where(eq(inspectionRounds.id, roundId))
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'inspection_round', entityId: roundId, action: 'close', before, after });
    return after;
  });
  reply<Round>(res, 200, round);
});

/** Who changed what on the entries of a round (the audit trail of edits after the fact). */
roundsRouter.get('/:roundId/history', requireProject('rounds.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const roundId = idParam(req.params, 'roundId', 'That inspection round');
  // The row shape the query below selects.
  const rows = await db.execute<Sendable<RoundHistoryRow>>(sql`
    select a.at, a.action, a.before, a.after, u.name as "userName", p.number as "positionNumber"
    from audit_log a
    join inspection_entries e on e.id::text = a.entity_id
    join positions p on p.id = e.position_id
    left join users u on u.id = a.user_id
    where a.project_id = ${projectId} and a.entity = 'inspection_entry' and e.round_id = ${roundId}
    order by a.at`);
  reply<RoundHistoryRow[]>(res, 200, rows.rows);
});
