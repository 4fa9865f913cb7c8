/**
 * `reply<W>(res, status, body)` (server/lib/reply.ts) and `Sendable<W>` (shared/schemas/wire.ts):
 * what reaches the client is `W`, dates as ISO 8601 text; and the compiler refuses a body that
 * would not arrive as `W` (checked here with the TypeScript compiler, so `npm test` sees it too).
 */
import express from 'express';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import request from 'supertest';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';
import { reply } from '../../server/lib/reply';

interface Answer {
  at: string;
  status: 'open' | 'done';
  count: number;
  when: { startedAt: string | null }[];
}

describe('reply', () => {
  it('sends the status and the body, a Date as ISO 8601 text in UTC', async () => {
    const app = express();
    app.get('/x', (_req, res) =>
      reply<Answer>(res, 201, {
        at: new Date(Date.UTC(2026, 11, 3, 6, 5, 4, 321)),
        status: 'open',
        count: 2,
        when: [{ startedAt: null }, { startedAt: new Date(Date.UTC(2026, 0, 31, 23, 0, 0)) }],
      }),
    );
    const res = await request(app).get('/x');
    expect(res.status).toBe(201);
    // ECMA-262 Date.prototype.toJSON calls toISOString: "YYYY-MM-DDTHH:mm:ss.sssZ" (§21.4.4.36–37).
    expect(res.body).toEqual({
      at: '2026-12-03T06:05:04.321Z',
      status: 'open',
      count: 2,
      when: [{ startedAt: null }, { startedAt: '2026-01-31T23:00:00.000Z' }],
    });
  });
});

describe('Sendable: what the compiler lets a route send', () => {
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
  const probe = path.join(root, 'tests/server/__sendable-probe.ts');
  const source = `
import type { Sendable } from '../../shared/schemas/wire';
interface Answer { at: string; status: 'open' | 'done'; count: number; rows: { id: string; at: string | null }[] }
const date = new Date(0);
export const ok1: Sendable<Answer> = { at: date, status: 'done', count: 1, rows: [{ id: 'a', at: null }, { id: 'b', at: date }] };
export const ok2: Sendable<Answer> = { at: 'text', status: 'open', count: 0, rows: [] };
export const bad1: Sendable<Answer> = { at: date, status: date, count: 1, rows: [] };
export const bad2: Sendable<Answer> = { at: date, status: 'shut', count: 1, rows: [] };
export const bad3: Sendable<Answer> = { at: date, status: 'open', count: '1', rows: [] };
export const bad4: Sendable<Answer> = { at: date, status: 'open', rows: [] };
export const bad5: Sendable<Answer> = { at: null, status: 'open', count: 1, rows: [] };
`;

  it('takes W, and W with Dates for its text, but not a wrong literal, type, or a missing field', () => {
    const options: ts.CompilerOptions = { strict: true, noEmit: true, target: ts.ScriptTarget.ES2022, skipLibCheck: true, types: [] };
    const host = ts.createCompilerHost(options);
    const readFile = host.readFile.bind(host);
    const fileExists = host.fileExists.bind(host);
    host.readFile = (f) => (path.resolve(f) === probe ? source : readFile(f));
    host.fileExists = (f) => path.resolve(f) === probe || fileExists(f);
    const getSourceFile = host.getSourceFile.bind(host);
    host.getSourceFile = (f, lang) => (path.resolve(f) === probe ? ts.createSourceFile(f, source, lang) : getSourceFile(f, lang));
    const program = ts.createProgram([probe], options, host);
    const file = program.getSourceFile(probe)!;
    const refused = ts
      .getPreEmitDiagnostics(program, file)
      .map((d) => file.text.slice(file.getLineStarts()[file.getLineAndCharacterOfPosition(d.start ?? 0).line]).match(/const (\w+)/)?.[1]);
    // derived: each bad line breaks one rule of Sendable (no Date for a literal union, the literal, number, required, not null).
    expect([...new Set(refused)].sort()).toEqual(['bad1', 'bad2', 'bad3', 'bad4', 'bad5']);
  }, 60_000);
});
