/**
 * The built client as the server sends it (decision 44): hashed assets with a year's immutable
 * cache, brotli or gzip copies made at build time sent to a browser that accepts them (and the
 * plain file to one that does not), index.html revalidated every time. The decoded bytes are
 * checked against the file on disk with Node's own zlib, not with the plugin that wrote them.
 */
import { readdirSync, readFileSync } from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { ensureClientBuilt } from '../../server/devenv/client-build';

const app = createApp({ clientDir: 'dist' });
let asset: string;
let afterAllClose: () => Promise<void>;

let base: string;
/** The bytes as they cross the wire (supertest would decode them). */
function raw(urlPath: string, acceptEncoding: string): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    http
      .get(`${base}${urlPath}`, { headers: { 'accept-encoding': acceptEncoding } }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
      })
      .on('error', reject);
  });
}

describe('static files', () => {
  beforeAll(async () => {
    ensureClientBuilt('.');
    const server = app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    afterAllClose = () => new Promise<void>((r) => server.close(() => r()));
    // The largest script: certainly over the compression threshold.
    asset = readdirSync('dist/assets')
      .filter((f) => f.endsWith('.js'))
      .map((f) => ({ f, size: readFileSync(path.join('dist/assets', f)).length }))
      .sort((a, b) => b.size - a.size)[0].f;
  });

  afterAll(() => afterAllClose());

  it('sends a hashed script as brotli, immutable for a year, and the bytes decode to the file', async () => {
    const res = await raw(`/assets/${asset}`, 'br, gzip');
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('br');
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(res.headers['content-type']).toMatch(/javascript/);
    expect(brotliDecompressSync(res.body).equals(readFileSync(path.join('dist/assets', asset)))).toBe(true);
  });

  it('sends gzip to a browser without brotli and the plain file to one without either', async () => {
    const gz = await raw(`/assets/${asset}`, 'gzip');
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(gunzipSync(gz.body).equals(readFileSync(path.join('dist/assets', asset)))).toBe(true);
    const plain = await raw(`/assets/${asset}`, 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.equals(readFileSync(path.join('dist/assets', asset)))).toBe(true);
  });

  it('revalidates the app shell on every visit', async () => {
    const res = await request(app).get('/sign-in');
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toBe('no-cache');
    expect(res.text).toMatch(/<div id="root">/);
  });
});

/** One chunk of the build as `dist/.vite/chunks.json` lists it (written by vite.config.ts, decision 47). */
interface BuiltChunk {
  file: string;
  isEntry: boolean;
  /** The module the chunk stands for (an entry or a lazily imported module), from the project root. */
  facade: string | null;
  imports: string[];
  dynamicImports: string[];
  /** The modules with code in this chunk, from the project root (`node_modules/…`, `src/…`, `shared/…`). */
  modules: string[];
}

describe('what the sign-in page loads (decision 47)', () => {
  let chunks: BuiltChunk[];
  /** The chunks the browser fetches for /sign-in: the entry, the router and the sign-in route, each with what it imports statically. */
  let signInChunks: BuiltChunk[];
  let signInModules: string[];

  beforeAll(() => {
    ensureClientBuilt('.');
    chunks = JSON.parse(readFileSync('dist/.vite/chunks.json', 'utf8')) as BuiltChunk[];
    const byFile = new Map(chunks.map((c) => [c.file, c]));
    const lazy = (facade: string) => {
      const c = chunks.find((x) => x.facade === facade);
      if (!c) throw new Error(`no chunk stands for ${facade} in dist/.vite/chunks.json`);
      return c;
    };
    const entry = chunks.filter((c) => c.isEntry);
    expect(entry.map((c) => c.facade)).toEqual(['index.html']);
    const seen = new Set<BuiltChunk>();
    const visit = (c: BuiltChunk) => {
      if (seen.has(c)) return;
      seen.add(c);
      for (const f of c.imports) visit(byFile.get(f)!);
    };
    for (const c of [...entry, lazy('src/app/router.tsx'), lazy('src/features/auth/routes/sign-in.tsx')]) visit(c);
    signInChunks = [...seen];
    signInModules = signInChunks.flatMap((c) => c.modules);
  });

  it('includes what the sign-in form runs on (so the checks below look at the real graph)', () => {
    for (const m of [
      'src/main.tsx',
      'src/features/auth/routes/sign-in.tsx',
      'shared/schemas/auth.ts',
      'node_modules/react-dom/',
      'node_modules/react-hook-form/',
    ])
      expect(
        signInModules.some((id) => id.startsWith(m)),
        m,
      ).toBe(true);
  });

  it('loads no charting code, though the build has it for the chart screens', () => {
    const charting = /^node_modules\/(recharts|d3-[a-z-]+|victory-vendor|@reduxjs)\//;
    expect(chunks.flatMap((c) => c.modules).some((id) => charting.test(id))).toBe(true);
    expect(signInModules.filter((id) => charting.test(id))).toEqual([]);
  });

  it("loads no other feature's code or schemas and not the signed-in frame", () => {
    expect(signInModules.filter((id) => id.startsWith('src/features/') && !id.startsWith('src/features/auth/'))).toEqual([]);
    // The sign-in form's schema and the field blocks it is made of; no other resource's schemas.
    expect(signInModules.filter((id) => id.startsWith('shared/schemas/')).sort()).toEqual([
      'shared/schemas/auth.ts',
      'shared/schemas/fields.ts',
    ]);
    expect(signInModules).not.toContain('src/components/layout/app-shell.tsx');
  });

  it('does not serve the chunk list (a dot-folder: the browser gets the app shell instead)', async () => {
    for (const encoding of ['br, gzip', 'identity']) {
      const res = await request(app).get('/.vite/chunks.json').set('Accept-Encoding', encoding);
      expect(res.text).not.toMatch(/"modules"/);
      expect(res.text).toMatch(/<div id="root">/);
    }
  });

  it('precaches every chunk for offline use (decision 42), the ones the sign-in page does not load included', () => {
    // The precache list Workbox's build step wrote into the worker: {"revision":…,"url":"assets/…"}.
    const precached = new Set([...readFileSync('dist/sw.js', 'utf8').matchAll(/"url":"([^"]+)"/g)].map((m) => m[1]));
    const missing = chunks.map((c) => c.file).filter((f) => !precached.has(f));
    expect(chunks.length).toBeGreaterThan(signInChunks.length);
    expect(missing).toEqual([]);
  });
});
