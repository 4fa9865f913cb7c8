/**
 * Loads the simulated demo history (simulate-drive.ts) into an empty demo project in bulk: layout,
 * geology, advance log, serials, fitted periods, rounds and entries, then the rolled distances.
 */
import { randomUUID } from 'node:crypto';
import { refreshRolledDistance } from '../../services/rolled-distance';
import type { DbOrTx } from '../client';
import {
  crewMembers,
  crews,
  cutterEvents,
  cutters,
  entrySubmissions,
  fittings,
  geologySections,
  groundTypes,
  inspectionEntries,
  inspectionRounds,
  positions,
  strokes,
} from '../schema';
import { demoGroundTypes, demoSections, simulateDrive } from './simulate-drive';

async function insertChunked<T>(rows: T[], insert: (chunk: T[]) => Promise<unknown>, size = 1000) {
  for (let i = 0; i < rows.length; i += size) await insert(rows.slice(i, i + size));
}

export async function loadDemoDrive(tx: DbOrTx, projectId: string, fitterId: string | null): Promise<void> {
  const drive = simulateDrive();

  const groundRows = await tx
    .insert(groundTypes)
    .values(
      demoGroundTypes.map((g) => ({
        projectId,
        name: g.name,
        description: g.description,
        ucsMpa: g.ucsMpa,
        cai: g.cai,
        quartzPct: g.quartzPct,
      })),
    )
    .returning();
  const groundId = new Map(demoGroundTypes.map((g, i) => [g.key, groundRows[i].id]));
  await tx.insert(geologySections).values(
    demoSections.map((s) => ({
      projectId,
      chainageFromM: s.fromM,
      chainageToM: s.toM,
      groundTypeId: groundId.get(s.groundKey)!,
      waterHeadM: s.waterHeadM,
      stopAllowed: s.stopAllowed,
      stopReason: s.stopReason,
    })),
  );

  const positionRows = await tx
    .insert(positions)
    .values(drive.positions.map((p) => ({ ...p, projectId })))
    .returning();
  const positionId = new Map(positionRows.map((p) => [p.number, p.id]));

  await insertChunked(drive.strokes, (chunk) => tx.insert(strokes).values(chunk.map((s) => ({ ...s, projectId }))));

  const cutterRows = await tx
    .insert(cutters)
    .values(drive.cutters.map((c) => ({ projectId, serial: c.serial, discSizeIn: 17, status: c.status, rebuildCount: c.rebuildCount })))
    .returning();
  const cutterId = new Map(cutterRows.map((c) => [c.serial, c.id]));

  const fittingRows = drive.fittings.map((f) => ({
    id: randomUUID(),
    projectId,
    cutterId: cutterId.get(f.serial)!,
    positionId: positionId.get(f.positionNumber)!,
    fittedAt: f.fittedAt,
    fittedChainageM: f.fittedChainageM,
    fittedRing: f.fittedRing,
    removedAt: f.removedAt,
    removedChainageM: f.removedChainageM,
    removedRing: f.removedRing,
    removalReason: f.reason,
    removalConditions: f.conditions,
  }));
  await insertChunked(fittingRows, (chunk) => tx.insert(fittings).values(chunk));
  /** The fitted period of `serial` at a position that was on it at time `at` (removal at `at` included). */
  const fittingAt = (serial: string, positionNumber: number, at: Date) =>
    drive.fittings.findIndex(
      (f) => f.serial === serial && f.positionNumber === positionNumber && f.fittedAt <= at && (f.removedAt === null || f.removedAt >= at),
    );

  await insertChunked(drive.events, (chunk) =>
    tx.insert(cutterEvents).values(
      chunk.map((e) => ({
        projectId,
        cutterId: cutterId.get(e.serial)!,
        at: e.at,
        kind: e.kind,
        positionId: e.positionNumber ? positionId.get(e.positionNumber)! : null,
        details: e.details,
      })),
    ),
  );

  const roundRows = await tx
    .insert(inspectionRounds)
    .values(
      drive.rounds.map((r) => ({
        projectId,
        startedAt: r.startedAt,
        chainageM: r.chainageM,
        ringNumber: r.ringNumber,
        crew: r.crew,
        closedAt: new Date(r.startedAt.getTime() + 4 * 3600_000),
        createdBy: fitterId,
      })),
    )
    .returning();
  const entries = drive.rounds.flatMap((r, i) =>
    r.entries.map((e, k) => ({
      id: randomUUID(),
      projectId,
      roundId: roundRows[i].id,
      positionId: positionId.get(e.positionNumber)!,
      clientKey: randomUUID(),
      fittingId: fittingRows[fittingAt(e.removedSerial, e.positionNumber, r.startedAt)]?.id ?? null,
      wearMm: e.wearMm,
      conditions: e.conditions,
      action: e.changed ? ('changed' as const) : ('none' as const),
      removedCutterId: e.changed ? cutterId.get(e.removedSerial)! : null,
      fittedCutterId: e.fittedSerial ? cutterId.get(e.fittedSerial)! : null,
      changeReason: e.reason,
      recordedAt: new Date(r.startedAt.getTime() + k * 240_000),
      recordedBy: fitterId,
    })),
  );
  await insertChunked(entries, (chunk) => tx.insert(inspectionEntries).values(chunk));
  await insertChunked(entries, (chunk) =>
    tx.insert(entrySubmissions).values(chunk.map((e) => ({ projectId, clientKey: e.clientKey, entryId: e.id }))),
  );

  // Three crews on the shifts of the simulation; crew A's lead is the demo fitter.
  const crewRows = await tx
    .insert(crews)
    .values(['Crew A', 'Crew B', 'Crew C'].map((name) => ({ projectId, name })))
    .returning();
  await tx.insert(crewMembers).values([
    { crewId: crewRows[0].id, name: 'Tomas Vella', email: 'fitter@kerfwise.test', userId: fitterId },
    { crewId: crewRows[0].id, name: 'Jonah Pell', email: 'crew-a@kerfwise.test' },
    { crewId: crewRows[1].id, name: 'Ada Okafor', email: 'crew-b@kerfwise.test' },
    { crewId: crewRows[2].id, name: 'Lars Lindqvist', email: 'crew-c@kerfwise.test' },
  ]);

  await refreshRolledDistance(tx, projectId);
}
