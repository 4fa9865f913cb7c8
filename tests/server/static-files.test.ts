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
