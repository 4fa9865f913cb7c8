/**
 * Commonly used passwords, refused as new passwords (OWASP ASVS 5.0 §6.2: "passwords submitted
 * … are checked against … a list of at least the top 3,000 passwords"). The list is the first
 * 10,000 entries, ranked by frequency, of the password list bundled with @zxcvbn-ts/language-common
 * 3.0.4 (MIT; https://github.com/zxcvbn-ts/zxcvbn), itself compiled from published leaked-password
 * corpora. It ships with the app: no check leaves the machine.
 */
import passwords from '@zxcvbn-ts/language-common/src/passwords.json';

export const COMMON_PASSWORD_COUNT = 10_000;

let common: Set<string> | undefined;

/** True when `password` (compared without regard to case) is among the 10,000 most common. */
export function isCommonPassword(password: string): boolean {
  common ??= new Set((passwords as string[]).slice(0, COMMON_PASSWORD_COUNT));
  return common.has(password.toLowerCase());
}
