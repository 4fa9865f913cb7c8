import argon2 from 'argon2';

/**
 * argon2id at the OWASP Password Storage Cheat Sheet minimum: m = 19 MiB, t = 2, p = 1.
 * Raising these later is safe: verify reads the parameters from each stored hash.
 */
const options = { type: argon2.argon2id, memoryCost: 19 * 1024, timeCost: 2, parallelism: 1 } as const;

export const hashPassword = (password: string) => argon2.hash(password, options);

export async function verifyPassword(hash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}

/** A hash of a random password, verified against when the account does not exist, so both answers take as long. */
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword(`no-such-user-${Math.random()}`);
  return dummyHash;
}
