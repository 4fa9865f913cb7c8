/**
 * New-password rule (OWASP ASVS 5.0 §6.2.1 at least 8 characters — Kerfwise asks 12 — and §6.2.4
 * checked against a list of commonly used passwords). The list's own entries come from the
 * published @zxcvbn-ts/language-common password list, read here straight from the package file.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { isCommonPassword } from '../../shared/common-passwords';
import { newPasswordSchema } from '../../shared/schemas/password';

const published: string[] = JSON.parse(
  readFileSync(createRequire(import.meta.url).resolve('@zxcvbn-ts/language-common/src/passwords.json'), 'utf8'),
);

describe('commonly used passwords', () => {
  it('refuses the long ones among the 10,000 most common (e.g. "1qaz2wsx3edc", a keyboard walk), whatever the case', () => {
    const longCommon = published.slice(0, 10_000).filter((p) => p.length >= 12);
    expect(longCommon.length).toBeGreaterThan(10);
    for (const p of longCommon) expect(newPasswordSchema.safeParse(p).success, p).toBe(false);
    expect(isCommonPassword('1QAZ2WSX3EDC')).toBe(true);
  });

  it('accepts a long uncommon passphrase and refuses a short one', () => {
    expect(newPasswordSchema.safeParse('gauge disc on the night shift').success).toBe(true);
    expect(newPasswordSchema.safeParse('short one').success).toBe(false);
  });

  it('only the first 10,000 count (entry 10,001 onwards is allowed when long enough)', () => {
    const beyond = published.slice(10_000).find((p) => p.length >= 12 && !published.slice(0, 10_000).includes(p.toLowerCase()));
    expect(beyond).toBeDefined();
    expect(isCommonPassword(beyond!)).toBe(false);
  });
});
