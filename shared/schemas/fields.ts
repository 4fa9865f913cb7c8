/**
 * The building blocks every input schema is made of, so that each kind of value has one range and
 * one message everywhere (issue: "every input in range, every error a 4xx"). A value outside these
 * ranges is refused with a 400 naming the field; nothing out of range reaches the database, where
 * it could break a page for everyone (a year-9999 stop, a ring of 2^31, a NUL in a name).
 */
import { z } from 'zod';

/** Dates Kerfwise accepts: a drive's records fall well inside these years. */
export const DATE_WINDOW = { from: '1990-01-01', to: '2100-12-31' } as const;
/** The largest ring number, count or other whole number stored (PostgreSQL integer). */
export const INT32_MAX = 2_147_483_647;
/** Chainages are within ±1,000 km of the drive's survey origin (m). */
export const CHAINAGE_LIMIT_M = 1_000_000;
/** Lengths along the drive: at most 1,000 km (m). */
export const LENGTH_LIMIT_M = 1_000_000;
/** The longest e-mail address (RFC 5321 §4.5.3.1.3: a path of 256 octets, less the brackets). */
export const EMAIL_MAX = 254;

const yearMs = (day: string) => Date.parse(`${day}T00:00:00Z`);
const WINDOW_MS = { from: yearMs(DATE_WINDOW.from), to: yearMs(DATE_WINDOW.to) + 86_400_000 };
/** Whether an instant (ms since the epoch) lies in the window `instant` accepts. */
export const inWindow = (ms: number) => ms >= WINDOW_MS.from - 14 * 3_600_000 && ms < WINDOW_MS.to + 14 * 3_600_000;
const windowText = `between ${DATE_WINDOW.from.slice(0, 4)} and ${DATE_WINDOW.to.slice(0, 4)}`;

/** A calendar date YYYY-MM-DD between 1990 and 2100. */
export const calendarDate = (label: string, message = `${label} must be a date like 2026-11-30.`) =>
  z.iso.date({ message }).refine((d) => d >= DATE_WINDOW.from && d <= DATE_WINDOW.to, `${label} must be ${windowText}.`);

/** An instant in ISO 8601 with its UTC offset (e.g. 2026-03-29T06:00:00+02:00), between 1990 and 2100. */
export const instant = (label: string, message = `${label} must be a date and time with its UTC offset, e.g. 2026-03-29T06:00:00+02:00.`) =>
  z.iso.datetime({ offset: true, message }).refine((t) => inWindow(Date.parse(t)), `${label} must be ${windowText}.`);

/** A whole number from 0 to 2^31 − 1 (ring numbers, counts, quantities); a lower `max` where the trade has one. */
export const wholeNumber = (label: string, max: number = INT32_MAX, message = `${label} must be a whole number.`) =>
  z
    .number({ message })
    .int(`${label} must be a whole number.`)
    .min(0, `${label} cannot be negative.`)
    .max(max, `${label} must be at most ${max.toLocaleString('en')}.`);

/** The same, read from a query string or form text. */
export const wholeNumberText = (label: string, max: number = INT32_MAX) =>
  z.coerce.number({ message: `${label} must be a whole number.` }).pipe(wholeNumber(label, max));

/** A ring number. */
export const ringNumber = (label = 'The ring number') => wholeNumber(label);

/** A chainage in metres: finite, within ±1,000 km. */
export const chainageM = (label: string, message = `${label} must be a number of metres.`) =>
  z
    .number({ message })
    .refine(Number.isFinite, message)
    .refine((v) => Math.abs(v) <= CHAINAGE_LIMIT_M, `${label} must be within ±${CHAINAGE_LIMIT_M.toLocaleString('en')} m.`);

/** A length along the drive in metres: finite, 0 to 1,000 km. */
export const lengthM = (label: string, max: number = LENGTH_LIMIT_M) =>
  z
    .number({ message: `${label} must be a number of metres.` })
    .refine(Number.isFinite, `${label} must be a number of metres.`)
    .refine((v) => v >= 0 && v <= max, `${label} must be between 0 and ${max.toLocaleString('en')} m.`);

// Control characters (C0, DEL, C1) other than line feed and carriage return; and the line breaks themselves.
// eslint-disable-next-line no-control-regex
export const CONTROL = /[\u0000-\u0009\u000b\u000c\u000e-\u001f\u007f-\u009f]/;
const LINE_BREAK = /[\r\n]/;

/** Free text (notes, reasons): trimmed, at most `max` characters, no control characters except line breaks. */
export const freeText = (label: string, max: number, message = `${label} must be text.`) =>
  z
    .string({ message })
    .max(max * 4, `${label} is too long: keep it to ${max} characters.`)
    .trim()
    .max(max, `${label} is too long: keep it to ${max} characters.`)
    .refine((s) => !CONTROL.test(s), `${label} contains a control character (such as NUL or a tab); remove it and try again.`);

/** A name or other one-line text: as free text, and no line breaks. */
export const singleLine = (label: string, max: number, message?: string) =>
  freeText(label, max, message).refine((s) => !LINE_BREAK.test(s), `${label} must be on one line.`);

/** A required name or one-line text (at least one character after trimming). */
export const requiredLine = (label: string, max: number, emptyMessage = `Enter ${label.toLowerCase()}.`) =>
  singleLine(label, max, emptyMessage).refine((s) => s.length > 0, emptyMessage);

/** An e-mail address: its length is checked before any other work, then trimmed, lower-cased and checked. */
export const emailAddress = () =>
  z
    .string({ message: 'Enter an e-mail address.' })
    .max(EMAIL_MAX + 64, `An e-mail address has at most ${EMAIL_MAX} characters.`)
    .trim()
    .toLowerCase()
    .max(EMAIL_MAX, `An e-mail address has at most ${EMAIL_MAX} characters.`)
    .pipe(z.email({ message: 'Enter a valid e-mail address, like name@example.com.' }));
