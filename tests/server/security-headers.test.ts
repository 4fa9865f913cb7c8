/**
 * Helmet runs once at start and its headers are replayed per request (server/app.ts,
 * securityHeaders; decision 45). Checked against Helmet itself running per request: the same
 * headers with the same values, and X-Powered-By removed.
 */
import express from 'express';
import helmet from 'helmet';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { helmetOptions, securityHeaders } from '../../server/app';

function appWith(middleware: express.RequestHandler) {
  const app = express();
  app.use(middleware);
  app.get('/x', (_req, res) => {
    res.send('ok');
  });
  return app;
}

const compared = (headers: Record<string, unknown>) => {
  const { date: _date, ...rest } = headers;
  return rest;
};

describe('security headers recorded once', () => {
  it('sends exactly what Helmet sends per request (Helmet itself is the reference)', async () => {
    const byHelmet = await request(appWith(helmet(helmetOptions))).get('/x');
    const recorded = await request(appWith(securityHeaders())).get('/x');
    expect(compared(recorded.headers)).toEqual(compared(byHelmet.headers));
    // The ones the threat model relies on (decision 29), so an empty recording cannot pass.
    expect(recorded.headers['content-security-policy']).toContain("default-src 'self'");
    expect(recorded.headers['content-security-policy']).not.toContain('upgrade-insecure-requests');
    expect(recorded.headers['x-content-type-options']).toBe('nosniff');
    expect(recorded.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(recorded.headers['x-powered-by']).toBeUndefined();
  });
});
