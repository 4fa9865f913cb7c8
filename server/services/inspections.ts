/**
 * Recording what the fitter found at each position, and the cutter changes made there. Shared by
 * the rounds routes and the demo loader. Every entry is one transaction: the entry, the fitted
 * periods it closes and opens, the serials' states and events, and the audit rows.
 */
import { and, desc, eq, isNull, ne, sql } from 'drizzle-orm';
import { conditionNeedsChange, type DiscCondition } from '../../shared/cutters';
import type { EntryInput, StartRoundInput } from '../../shared/schemas/inspection';
import { formatSiteDate } from '../../shared/site-time';
import type { DbOrTx } from '../db/client';
import {
  cutterEvents,
  cutters,
  entrySubmissions,
  fittings,
  inspectionEntries,
  inspectionRounds,
  positions,
  projects,
  strokes,
} from '../db/schema';
import { driveDataChanged } from './drive-data';
import { recordEntryExposure } from './rolled-distance';
import { audit } from '../lib/audit';
import { ConflictError, NotFoundError } from '../lib/errors';

type Entry = typeof inspectionEntries.$inferSelect;

/** Starts a round, or — for a round started offline and sent again with its id — answers with the one stored (decision 42). */
export async function startRoundOnce(tx: DbOrTx, projectId: string, userId: string | null, input: StartRoundInput) {
  if (input.id) {
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`kerfwise-round:${input.id}`}))`);
    const [existing] = await tx.select().from(inspectionRounds).where(eq(inspectionRounds.id, input.id));
    if (existing && existing.projectId !== projectId) throw new ConflictError('That round id is already used. Start the round again.');
    if (existing) return { round: existing, replayed: true };
  }
  return { round: await startRound(tx, projectId, userId, input), replayed: false };
}

export async function startRound(tx: DbOrTx, projectId: string, userId: string | null, input: StartRoundInput) {
  const [round] = await tx
    .insert(inspectionRounds)
    .values({
      ...(input.id ? { id: input.id } : {}),
      projectId,
      createdBy: userId,
      startedAt: new Date(input.startedAt),
      chainageM: input.chainageM,
      ringNumber: input.ringNumber,
      crew: input.crew,
      notes: input.notes,
    })
    .returning();
  await audit(tx, { userId, projectId, entity: 'inspection_round', entityId: round.id, action: 'create', after: round });
  return round;
}

/** The site's time zone, for dates in messages (read only when a message needs one). */
async function siteTimeZoneOf(tx: DbOrTx, projectId: string): Promise<string> {
  const [p] = await tx.select({ tz: projects.siteTimeZone }).from(projects).where(eq(projects.id, projectId));
  return p.tz;
}

const wearFell = (wearMm: number, last: { wearMm: number; at: Date; serial: string }, timeZone: string) =>
  new ConflictError(
    `Wear ${wearMm} mm is less than the ${last.wearMm} mm measured on ${formatSiteDate(last.at, timeZone)} on the same disc (serial ${last.serial}), with no change in between. Check the value; if the earlier one was wrong, confirm this one as re-measured.`,
    [
      {
        path: 'wearMm',
        message: `Less than the last ${last.wearMm} mm on this disc. Confirm as re-measured if the earlier value was wrong.`,
      },
    ],
  );

/** Flags the fitter sees at a glance. */
export function entryFlags(entry: Pick<Entry, 'wearMm' | 'conditions' | 'action'>, wearLimitMm: number) {
  const overLimit = entry.wearMm != null && entry.wearMm >= wearLimitMm;
  return { overLimit, needsChange: entry.action === 'none' && (overLimit || conditionNeedsChange(entry.conditions as DiscCondition[])) };
}

/**
 * Records (or edits) one position of a round. Returns `replayed: true` when the same clientKey
 * was stored before — a queued entry sent twice is stored once.
 */
export async function recordEntry(tx: DbOrTx, projectId: string, roundId: string, userId: string | null, input: EntryInput) {
  // Two identical submissions at the same moment (two tabs, a retry racing the original): the
  // second waits here until the first commits, then finds it below as a replay (decision 14).
  // Transaction-scoped, so callers pass a transaction.
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`kerfwise-entry:${projectId}:${input.clientKey}`}))`);
  const [replay] = await tx
    .select({ entry: inspectionEntries })
    .from(entrySubmissions)
    .innerJoin(inspectionEntries, eq(inspectionEntries.id, entrySubmissions.entryId))
    .where(and(eq(entrySubmissions.projectId, projectId), eq(entrySubmissions.clientKey, input.clientKey)))
    .then((rows) => rows.map((r) => r.entry));
  if (replay) {
    const [pos] = await tx.select().from(positions).where(eq(positions.id, replay.positionId));
    return { entry: replay, replayed: true, ...entryFlags(replay, pos.wearLimitMm) };
  }

  const [round] = await tx
    .select()
    .from(inspectionRounds)
    .where(and(eq(inspectionRounds.id, roundId), eq(inspectionRounds.projectId, projectId)))
    .for('update');
  if (!round) throw new NotFoundError('That inspection round');
  if (round.closedAt) throw new ConflictError('This round is closed. Start a new round to record more.');
  const [position] = await tx
    .select()
    .from(positions)
    .where(and(eq(positions.id, input.positionId), eq(positions.projectId, projectId)));
  if (!position) throw new NotFoundError('That position');

  const [current] = await tx
    .select({ fitting: fittings, serial: cutters.serial })
    .from(fittings)
    .innerJoin(cutters, eq(cutters.id, fittings.cutterId))
    .where(and(eq(fittings.positionId, position.id), isNull(fittings.removedAt)))
    .for('update');
  const [prior] = await tx
    .select()
    .from(inspectionEntries)
    .where(and(eq(inspectionEntries.roundId, round.id), eq(inspectionEntries.positionId, position.id)));
  // Two tablets, same position, same round, both offline: the later-recorded entry wins whatever
  // order they arrive in; the earlier one is kept in the audit trail as overtaken (decision 42).
  const recordedAt = input.recordedAt ? new Date(input.recordedAt) : new Date();
  if (prior && input.recordedAt && recordedAt.getTime() < prior.recordedAt.getTime()) {
    await audit(tx, {
      userId,
      projectId,
      entity: 'inspection_entry',
      entityId: prior.id,
      action: 'overtaken',
      before: { ...input, recordedBy: userId },
      after: prior,
    });
    await tx.insert(entrySubmissions).values({ projectId, clientKey: input.clientKey, entryId: prior.id });
    return { entry: prior, replayed: false, overtaken: true, ...entryFlags(prior, position.wearLimitMm) };
  }
  if (prior?.action === 'changed' && input.action === 'none') {
    throw new ConflictError(
      `Position ${position.number} was recorded as changed in this round. A change cannot be undone by an edit; ask the planner to correct it.`,
    );
  }

  // The disc the fitter measured: the one on the position when they came to it.
  const measuredFittingId = prior ? prior.fittingId : (current?.fitting.id ?? null);

  if (input.wearMm != null && measuredFittingId) {
    const [last] = await tx
      .select({ wearMm: inspectionEntries.wearMm, at: inspectionRounds.startedAt, serial: cutters.serial })
      .from(inspectionEntries)
      .innerJoin(inspectionRounds, eq(inspectionRounds.id, inspectionEntries.roundId))
      .innerJoin(fittings, eq(fittings.id, inspectionEntries.fittingId))
      .innerJoin(cutters, eq(cutters.id, fittings.cutterId))
      .where(
        and(
          eq(inspectionEntries.fittingId, measuredFittingId),
          sql`${inspectionEntries.wearMm} is not null`,
          sql`${inspectionRounds.startedAt} <= ${round.startedAt}`,
          prior ? ne(inspectionEntries.id, prior.id) : undefined,
        ),
      )
      .orderBy(desc(inspectionRounds.startedAt), desc(inspectionEntries.recordedAt))
      .limit(1);
    if (last?.wearMm != null && input.wearMm < last.wearMm) {
      if (!input.remeasured)
        throw wearFell(input.wearMm, { wearMm: last.wearMm, at: last.at, serial: last.serial }, await siteTimeZoneOf(tx, projectId));
      await audit(tx, {
        userId,
        projectId,
        entity: 'inspection_entry',
        entityId: input.clientKey,
        action: 'remeasured_correction',
        before: { lastWearMm: last.wearMm, lastMeasuredAt: last.at },
        after: { wearMm: input.wearMm, positionNumber: position.number },
      });
    }
  }

  let removedCutterId: string | null = prior?.removedCutterId ?? null;
  let fittedCutterId: string | null = prior?.fittedCutterId ?? null;
  if (input.action === 'changed' && prior?.action === 'changed') {
    const [fittedBefore] = await tx.select({ serial: cutters.serial }).from(cutters).where(eq(cutters.id, prior.fittedCutterId!));
    if (input.fitted && fittedBefore && input.fitted.serial !== fittedBefore.serial) {
      throw new ConflictError(
        `Position ${position.number} already has serial ${fittedBefore.serial} recorded as fitted in this round. Correcting the serial needs the planner.`,
      );
    }
  } else if (input.action === 'changed') {
    ({ removedCutterId, fittedCutterId } = await changeCutter(tx, { projectId, userId, round, position, current, input }));
  }

  const values = {
    wearMm: input.wearMm,
    conditions: input.conditions,
    action: input.action,
    removedCutterId,
    fittedCutterId,
    changeReason: input.action === 'changed' ? input.changeReason : null,
    note: input.note,
    remeasured: input.remeasured,
  };
  let entry: Entry;
  if (prior) {
    [entry] = await tx
      .update(inspectionEntries)
      .set({ ...values, recordedBy: userId, recordedAt, updatedAt: sql`now()` })
      .where(eq(inspectionEntries.id, prior.id))
      .returning();
    // Another user's entry overwritten (two tablets, the earlier-recorded arrived first): kept in
    // the trail as overtaken, naming its fitter in `before.recordedBy` (decision 42).
    const overtaken = prior.recordedBy != null && userId != null && prior.recordedBy !== userId;
    await audit(tx, {
      userId,
      projectId,
      entity: 'inspection_entry',
      entityId: entry.id,
      action: overtaken ? 'overtaken' : 'update',
      before: prior,
      after: entry,
    });
  } else {
    [entry] = await tx
      .insert(inspectionEntries)
      .values({
        ...values,
        projectId,
        roundId: round.id,
        positionId: position.id,
        clientKey: input.clientKey,
        fittingId: measuredFittingId,
        recordedBy: userId,
        recordedAt,
      })
      .returning();
    await audit(tx, { userId, projectId, entity: 'inspection_entry', entityId: entry.id, action: 'create', after: entry });
  }
  await tx.insert(entrySubmissions).values({ projectId, clientKey: input.clientKey, entryId: entry.id });
  if (!prior && entry.fittingId) await recordEntryExposure(tx, projectId, entry.id, entry.fittingId, round.startedAt);
  return { entry, replayed: false, overtaken: false, ...entryFlags(entry, position.wearLimitMm) };
}

interface ChangeContext {
  projectId: string;
  userId: string | null;
  round: typeof inspectionRounds.$inferSelect;
  position: typeof positions.$inferSelect;
  current: { fitting: typeof fittings.$inferSelect; serial: string } | undefined;
  input: EntryInput;
}

/** The issue of a refused fitted serial, beside the form's cutter picker. */
const fittedIssue = (message: string) => [{ path: 'fitted.serial', message }];

/** Closes the removed serial's fitted period and opens the fitted one's, at the round's place and time. */
async function changeCutter(tx: DbOrTx, { projectId, userId, round, position, current, input }: ChangeContext) {
  if (input.removedSerial && !current) {
    throw new ConflictError(
      `Kerfwise has no cutter on position ${position.number}, so ${input.removedSerial} cannot be taken off it. Check the position number.`,
      [{ path: 'removedSerial', message: 'Kerfwise has no cutter here; leave it empty if none was on.' }],
    );
  }
  if (input.removedSerial && current && input.removedSerial !== current.serial) {
    throw new ConflictError(
      `Kerfwise has serial ${current.serial} on position ${position.number}, not ${input.removedSerial}. Check the serial stamped on the hub.`,
      [{ path: 'removedSerial', message: `Kerfwise has ${current.serial} here, not ${input.removedSerial}. Check the serial on the hub.` }],
    );
  }
  const fittedSerial = input.fitted!.serial;
  let [fitted] = await tx
    .select()
    .from(cutters)
    .where(and(eq(cutters.projectId, projectId), eq(cutters.serial, fittedSerial)))
    .for('update');
  if (!fitted) {
    if (!input.fitted!.isNew) throw new NotFoundError(`Serial ${fittedSerial}`);
    [fitted] = await tx
      .insert(cutters)
      .values({ projectId, serial: fittedSerial, discSizeIn: position.discSizeIn, status: 'in_store' })
      .returning();
    await tx
      .insert(cutterEvents)
      .values({ projectId, cutterId: fitted.id, kind: 'received', userId, at: round.startedAt, details: { enteredAtFace: true } });
    await audit(tx, { userId, projectId, entity: 'cutter', entityId: fitted.id, action: 'create', after: fitted });
  }
  if (fitted.status === 'fitted') {
    const [where] = await tx
      .select({ number: positions.number, since: fittings.fittedAt })
      .from(fittings)
      .innerJoin(positions, eq(positions.id, fittings.positionId))
      .where(and(eq(fittings.cutterId, fitted.id), isNull(fittings.removedAt)));
    throw new ConflictError(
      `Serial ${fittedSerial} is already fitted at position ${where?.number ?? '?'}${where ? ` since ${formatSiteDate(where.since, await siteTimeZoneOf(tx, projectId))}` : ''}. A cutter cannot be in two places; check the serial.`,
      fittedIssue(`${fittedSerial} is already fitted at position ${where?.number ?? '?'}. Pick another cutter.`),
    );
  }
  if (fitted.status === 'scrapped')
    throw new ConflictError(`Serial ${fittedSerial} was scrapped and cannot be fitted.`, fittedIssue(`${fittedSerial} was scrapped.`));
  if (fitted.status === 'workshop')
    throw new ConflictError(
      `Serial ${fittedSerial} is in the workshop. Record its rebuild (Cutters → ${fittedSerial}) before fitting it.`,
      fittedIssue(`${fittedSerial} is in the workshop, not in store.`),
    );
  if (fitted.discSizeIn !== position.discSizeIn) {
    throw new ConflictError(
      `Serial ${fittedSerial} is a ${fitted.discSizeIn}″ cutter; position ${position.number} takes ${position.discSizeIn}″.`,
      fittedIssue(`${fittedSerial} is a ${fitted.discSizeIn}″ cutter; this position takes ${position.discSizeIn}″.`),
    );
  }

  const at = round.startedAt;
  // A change recorded back in time re-divides strokes already counted: recompute the drive next time.
  const [later] = await tx
    .select({ id: strokes.id })
    .from(strokes)
    .where(and(eq(strokes.projectId, projectId), sql`${strokes.startTime} > ${at}`))
    .limit(1);
  // (Not refreshed now: the fittings below are not changed yet.)
  if (later) await driveDataChanged(tx, projectId, { rewritesPast: true, refreshNow: false });
  let removedCutterId: string | null = null;
  if (current) {
    removedCutterId = current.fitting.cutterId;
    await tx
      .update(fittings)
      .set({
        removedAt: at,
        removedChainageM: round.chainageM,
        removedRing: round.ringNumber,
        removalReason: input.changeReason,
        removalConditions: input.conditions,
      })
      .where(eq(fittings.id, current.fitting.id));
    await tx
      .update(cutters)
      .set({ status: 'workshop', updatedAt: sql`now()` })
      .where(eq(cutters.id, removedCutterId));
    await tx.insert(cutterEvents).values({
      projectId,
      cutterId: removedCutterId,
      kind: 'removed',
      positionId: position.id,
      userId,
      at,
      details: {
        reason: input.changeReason,
        conditions: input.conditions,
        wearMm: input.wearMm,
        chainageM: round.chainageM,
        ringNumber: round.ringNumber,
      },
    });
  }
  await tx.insert(fittings).values({
    projectId,
    cutterId: fitted.id,
    positionId: position.id,
    fittedAt: at,
    fittedChainageM: round.chainageM,
    fittedRing: round.ringNumber,
  });
  await tx
    .update(cutters)
    .set({ status: 'fitted', updatedAt: sql`now()` })
    .where(eq(cutters.id, fitted.id));
  await tx.insert(cutterEvents).values({
    projectId,
    cutterId: fitted.id,
    kind: 'fitted',
    positionId: position.id,
    userId,
    at,
    details: { chainageM: round.chainageM, ringNumber: round.ringNumber },
  });
  return { removedCutterId, fittedCutterId: fitted.id };
}
