/**
 * The one call to make after a write to a drive's data (layout, geology, advance log, a change
 * recorded back in time): derived data follows from here, so a new kind of derived data is added
 * in one place instead of at every write. Today that is the stored rolled distances
 * (services/rolled-distance.ts, DEVELOPERS.md decision 12). The cached forecast needs no call:
 * database triggers raise the drive's data version in the same transaction (decision 38).
 */
import type { DbOrTx } from '../db/client';
import { invalidateRolledDistance, refreshRolledDistance, type KnownStrokes } from './rolled-distance';

export interface DriveDataChange {
  /**
   * The write changes what is already counted (a track radius, the geology, a replaced stroke, a
   * change recorded back in time): derived data is dropped and recomputed for the whole drive.
   * Otherwise (new strokes after the last counted one) it is extended.
   */
  rewritesPast: boolean;
  /**
   * Bring derived data up to date inside this transaction. Without it the next read does, which
   * a write must choose when it calls this before it has finished changing the data.
   */
  refreshNow: boolean;
  /** Strokes the write holds in memory (rolled-distance.ts, KnownStrokes): the refresh reads only the others. */
  known?: KnownStrokes;
}

/** Keeps a drive's derived data in step with a write to its data; call inside the write's transaction. */
export async function driveDataChanged(tx: DbOrTx, projectId: string, change: DriveDataChange): Promise<void> {
  if (change.rewritesPast) await invalidateRolledDistance(tx, projectId);
  if (change.refreshNow) await refreshRolledDistance(tx, projectId, change.known);
}
