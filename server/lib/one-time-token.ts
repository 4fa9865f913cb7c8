import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import { createHash, randomBytes } from 'node:crypto';
import type { DbOrTx } from '../db/client';
import { oneTimeTokens } from '../db/schema';

export type TokenPurpose = 'password_reset' | 'invitation';

export const tokenLifetimeHours: Record<TokenPurpose, number> = { password_reset: 1, invitation: 7 * 24 };

const sha256 = (token: string) => createHash('sha256').update(token).digest('hex');

/** Makes a one-time link token; only its hash is stored. Earlier unused tokens of the same purpose stop working. */
export async function issueToken(tx: DbOrTx, userId: string, purpose: TokenPurpose): Promise<string> {
  await tx
    .update(oneTimeTokens)
    .set({ usedAt: sql`now()` })
    .where(and(eq(oneTimeTokens.userId, userId), eq(oneTimeTokens.purpose, purpose), isNull(oneTimeTokens.usedAt)));
  const token = randomBytes(32).toString('base64url');
  await tx.insert(oneTimeTokens).values({
    userId,
    purpose,
    tokenHash: sha256(token),
    expiresAt: sql`now() + make_interval(hours => ${tokenLifetimeHours[purpose]})`,
  });
  return token;
}

/** Marks the token used and returns its user and purpose; null when unknown, used or expired. */
export async function consumeToken(tx: DbOrTx, token: string): Promise<{ userId: string; purpose: TokenPurpose } | null> {
  const [row] = await tx
    .update(oneTimeTokens)
    .set({ usedAt: sql`now()` })
    .where(and(eq(oneTimeTokens.tokenHash, sha256(token)), isNull(oneTimeTokens.usedAt), gt(oneTimeTokens.expiresAt, sql`now()`)))
    .returning({ userId: oneTimeTokens.userId, purpose: oneTimeTokens.purpose });
  return row ?? null;
}

/** Every unused link of a user stops working (after a password change or a completed reset). */
export async function revokeTokens(tx: DbOrTx, userId: string): Promise<void> {
  await tx
    .update(oneTimeTokens)
    .set({ usedAt: sql`now()` })
    .where(and(eq(oneTimeTokens.userId, userId), isNull(oneTimeTokens.usedAt)));
}
