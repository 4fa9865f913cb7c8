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
 * Sends due outbox messages one at a time. Each row is locked while it is sent (SKIP LOCKED), so
 * several server instances never send the same row; a failure is recorded and retried with back-off.
 */
export async function deliverPendingMail(options: DeliveryOptions = {}): Promise<{ sent: number; failed: number }> {
  const { limit = 50, kind } = options;
  const via = options.transport ?? getTransport();
  const now = options.asOf ? sql`${options.asOf.toISOString()}::timestamptz` : sql`now()`;
  let sent = 0;
  let failed = 0;
  for (let i = 0; i < limit; i++) {
    const outcome = await db.transaction(async (tx) => {
      const [row] = await tx
        .select()
        .from(outbox)
        .where(and(isNull(outbox.sentAt), lte(outbox.nextAttemptAt, now), kind ? eq(outbox.kind, kind) : undefined))
        .orderBy(asc(outbox.id))
        .limit(1)
        .for('update', { skipLocked: true });
      if (!row) return 'none' as const;
      try {
        await via.sendMail({ to: row.toAddresses, subject: row.subject, text: row.textBody, html: row.htmlBody ?? undefined });
        await tx.update(outbox).set({ sentAt: sql`now()`, attempts: row.attempts + 1, lastError: null }).where(sql`${outbox.id} = ${row.id}`);
        return 'sent' as const;
      } catch (err) {
        const attempts = row.attempts + 1;
        await tx
          .update(outbox)
          .set({
            attempts,
            lastError: err instanceof Error ? err.message : String(err),
            nextAttemptAt: sql`${now} + make_interval(mins => ${retryDelayMinutes(attempts)})`,
          })
          .where(sql`${outbox.id} = ${row.id}`);
        logger.warn({ outboxId: row.id, attempts, err: String(err) }, 'mail delivery failed; will retry');
        return 'failed' as const;
      }
    });
    if (outcome === 'none') break;
    if (outcome === 'sent') sent++;
    else failed++;
  }
  return { sent, failed };
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
