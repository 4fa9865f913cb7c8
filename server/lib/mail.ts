import { and, asc, eq, inArray, isNull, lte, sql } from 'drizzle-orm';
import nodemailer, { type Mail } from 'nodemailer';
import { db, type DbOrTx } from '../db/client';
import { notificationOptOuts, outbox } from '../db/schema';
import { env } from '../env';
import { logger } from './logger';

export interface OutgoingMail {
  to: string[];
  subject: string;
  text: string;
  html?: string;
  kind: string;
  projectId?: string | null;
  /** The stop or the person the message is about (Admin → Mail shows it). */
  about?: { stopId: string } | { userId: string };
}

/**
 * Puts a message in the outbox. Call it inside the transaction of the change that causes the mail,
 * so the mail exists exactly when the change does (DEVELOPERS.md, decision 8). Then call
 * `kickMailDelivery()` after the commit.
 */
export async function enqueueMail(tx: DbOrTx, mail: OutgoingMail): Promise<void> {
  await tx.insert(outbox).values({
    kind: mail.kind,
    projectId: mail.projectId ?? null,
    toAddresses: mail.to,
    subject: mail.subject,
    textBody: mail.text,
    htmlBody: mail.html ?? null,
    aboutStopId: mail.about && 'stopId' in mail.about ? mail.about.stopId : null,
    aboutUserId: mail.about && 'userId' in mail.about ? mail.about.userId : null,
  });
}

let transport: Mail | undefined;
function getTransport(): Mail {
  transport ??= nodemailer.createTransport(env().SMTP_URL, { from: env().MAIL_FROM });
  return transport;
}

export interface DeliveryOptions {
  limit?: number;
  /** Another transport (tests point it at a stopped or a second server). */
  transport?: Mail;
  /** The time that counts as now for due messages and back-off (tests move it forward). */
  asOf?: Date;
  /** Only messages of this kind. */
  kind?: string;
}

/** Minutes to wait before attempt n+1: 1, 2, 4, … capped at an hour. */
export const retryDelayMinutes = (attempts: number) => Math.min(60, 2 ** Math.max(0, attempts - 1));

/**
 * Sends due outbox messages one at a time. Each message is first claimed in its own committed
 * transaction (SKIP LOCKED, so several instances never take the same row), then handed to the SMTP
 * server, then marked sent. A refusal or an unreachable server clears the claim and schedules a
 * retry with back-off; a crash between the hand-over and the mark leaves the claim in place, and
 * such a message is never resent on its own (it may have gone out): the administrator sees it and
 * decides. So an outage loses nothing and a crash never sends twice.
 */
export async function deliverPendingMail(options: DeliveryOptions = {}): Promise<{ sent: number; failed: number }> {
  const { limit = 50, kind } = options;
  const via = options.transport ?? getTransport();
  const now = options.asOf ? sql`${options.asOf.toISOString()}::timestamptz` : sql`now()`;
  let sent = 0;
  let failed = 0;
  for (let i = 0; i < limit; i++) {
    const row = await db.transaction(async (tx) => {
      const [due] = await tx
        .select({ id: outbox.id })
        .from(outbox)
        .where(
          and(isNull(outbox.sentAt), isNull(outbox.claimedAt), lte(outbox.nextAttemptAt, now), kind ? eq(outbox.kind, kind) : undefined),
        )
        .orderBy(asc(outbox.id))
        .limit(1)
        .for('update', { skipLocked: true });
      if (!due) return undefined;
      const [claimed] = await tx
        .update(outbox)
        .set({ claimedAt: sql`now()`, attempts: sql`${outbox.attempts} + 1` })
        .where(eq(outbox.id, due.id))
        .returning();
      return claimed;
    });
    if (!row) break;
    try {
      await via.sendMail({ to: row.toAddresses, subject: row.subject, text: row.textBody, html: row.htmlBody ?? undefined });
    } catch (err) {
      await db
        .update(outbox)
        // Back-off from the time the attempt was due, not from when the tick got to it: measured
        // from "now", every step slipped by up to a tick (1, 2, 4 … became 2, 3, 5 …). When that is
        // already past (the job did not run for a while), from now: never due again in this pass.
        .set({
          claimedAt: null,
          lastError: err instanceof Error ? err.message : String(err),
          nextAttemptAt: sql`case
          when ${outbox.nextAttemptAt} + make_interval(mins => ${retryDelayMinutes(row.attempts)}) > ${now} then ${outbox.nextAttemptAt} + make_interval(mins => ${retryDelayMinutes(row.attempts)})
          else ${now} + make_interval(mins => ${retryDelayMinutes(row.attempts)}) end`,
        })
        .where(eq(outbox.id, row.id));
      logger.warn({ outboxId: row.id, attempts: row.attempts, err: String(err) }, 'mail delivery failed; will retry');
      failed++;
      continue;
    }
    await db
      .update(outbox)
      .set({ sentAt: sql`now()`, claimedAt: null, lastError: null })
      .where(eq(outbox.id, row.id));
    sent++;
  }
  return { sent, failed };
}

/** Claims older than this are a crash mid-send: shown to the administrator as uncertain. */
export const UNCERTAIN_AFTER_MINUTES = 10;

/** Puts a message whose delivery is uncertain back in the queue, on an administrator's decision. */
export async function releaseUncertainMail(id: number): Promise<boolean> {
  const rows = await db
    .update(outbox)
    .set({ claimedAt: null, nextAttemptAt: sql`now()` })
    // Only a stale claim: a message being sent right now is not touched.
    .where(
      and(eq(outbox.id, id), isNull(outbox.sentAt), sql`${outbox.claimedAt} < now() - make_interval(mins => ${UNCERTAIN_AFTER_MINUTES})`),
    )
    .returning({ id: outbox.id });
  return rows.length > 0;
}

/** Starts a delivery pass in the background (after a commit that queued mail). */
export function kickMailDelivery(): void {
  deliverPendingMail().catch((err) => logger.error({ err }, 'mail delivery pass failed'));
}

/** The user ids among `userIds` who turned notification `kind` off. */
export async function optedOut(tx: DbOrTx, userIds: string[], kind: string): Promise<Set<string>> {
  if (userIds.length === 0) return new Set();
  const rows = await tx
    .select({ userId: notificationOptOuts.userId })
    .from(notificationOptOuts)
    .where(and(inArray(notificationOptOuts.userId, userIds), eq(notificationOptOuts.kind, kind)));
  return new Set(rows.map((r) => r.userId));
}
