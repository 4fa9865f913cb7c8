/**
 * Load benchmark (issue 14): Kerfwise's hot reads under 50 connections, each beside its limit
 * measured in the same run on the same machine — a bare Express + pg process reading the same rows
 * (tests/bench/bare-server.ts). Kerfwise runs as its production entry (server/index.ts) in its own
 * process on the demo drive; autocannon drives both from this process. Figures are printed, never
 * asserted.
 */
import { fork, type ChildProcess } from 'node:child_process';
import http from 'node:http';
import os from 'node:os';
import autocannon from 'autocannon';
import { sql } from 'drizzle-orm';
import { db } from '../../server/db/client';
import { ensureClientBuilt } from '../../server/devenv/client-build';
import { DEMO_PASSWORD, demoUsers, seedDemo } from '../../server/db/seed-demo';
import { launchBrowser } from '../support/browser';

const CONNECTIONS = 50;
const DURATION_S = Number(process.env.BENCH_LOAD_SECONDS ?? 8);

interface Load {
  reqPerS: number;
  p50: number;
  p95: number;
  non2xx: number;
}

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

/** Seconds of load before each figure, not counted: both servers' code is compiled and optimised first. */
const WARM_UP_S = Number(process.env.BENCH_WARM_UP_SECONDS ?? 2);

/** autocannon at 50 connections; p95 from every response time it reports (its own summary stops at p90 and p97.5). */
async function load(url: string, headers: Record<string, string> = {}, seconds = DURATION_S): Promise<Load> {
  if (WARM_UP_S > 0)
    await new Promise((resolve, reject) =>
      autocannon({ url, connections: CONNECTIONS, duration: WARM_UP_S, headers }, (err, r) => (err ? reject(err) : resolve(r))),
    );
  const times: number[] = [];
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ url, connections: CONNECTIONS, duration: seconds, headers }, (err, r) =>
      err ? reject(err) : resolve(r),
    );
    instance.on('response', (_client, _status, _bytes, responseTime) => times.push(responseTime));
  });
  times.sort((a, b) => a - b);
  return {
    reqPerS: result.requests.average,
    p50: percentile(times, 50),
    p95: percentile(times, 95),
    non2xx: result.non2xx + result.errors,
  };
}

function start(script: string, env: Record<string, string>, readyUrl: string, execArgv: string[] = []): Promise<ChildProcess> {
  const child = fork(script, [], { execArgv: ['--import', 'tsx', ...execArgv], env: { ...process.env, ...env }, stdio: 'inherit' });
  return new Promise((resolve, reject) => {
    const deadline = Date.now() + 60_000;
    const poll = () =>
      http
        .get(readyUrl, (res) => {
          res.resume();
          resolve(child);
        })
        .on('error', () => (Date.now() > deadline ? reject(new Error(`${script} did not start`)) : setTimeout(poll, 250)));
    child.once('exit', (code) => reject(new Error(`${script} exited with ${code}`)));
    poll();
  });
}

const fmt = (l: Load) =>
  `${l.reqPerS.toFixed(0)} req/s, p50 ${l.p50.toFixed(0)} ms, p95 ${l.p95.toFixed(0)} ms${l.non2xx ? `, ${l.non2xx} non-2xx!` : ''}`;
const pct = (a: number, b: number) => `${((a / b) * 100).toFixed(0)} %`;

export async function benchLoad(databaseUrl: string, smtpUrl: string): Promise<string[]> {
  const out: string[] = [];
  const { projectId } = await seedDemo(db);
  ensureClientBuilt('.');
  const appPort = Number(process.env.KERFWISE_BENCH_HTTP_PORT ?? 3910);
  const barePort = appPort + 1;
  const base = `http://127.0.0.1:${appPort}`;
  const bare = `http://127.0.0.1:${barePort}`;
  const common = { DATABASE_URL: databaseUrl, LOG_LEVEL: 'warn' };
  const app = await start(
    'server/index.ts',
    { ...common, SMTP_URL: smtpUrl, PORT: String(appPort), APP_URL: base, SESSION_SECRET: 'bench-'.repeat(8), NODE_ENV: 'production' },
    `${base}/api/health`,
    // KERFWISE_BENCH_CPU_PROF=<dir>: a V8 CPU profile of Kerfwise's process (open in Chrome DevTools).
    // The profile is written at exit, so SIGTERM exits normally there.
    process.env.KERFWISE_BENCH_CPU_PROF
      ? [
          '--cpu-prof',
          `--cpu-prof-dir=${process.env.KERFWISE_BENCH_CPU_PROF}`,
          `--import=data:text/javascript,process.on('SIGTERM',()=>process.exit(0))`,
        ]
      : [],
  );
  const bareServer = await start(
    'tests/bench/bare-server.ts',
    { ...common, PORT: String(barePort), PROJECT_ID: projectId },
    `${bare}/json`,
  );
  try {
    const planner = demoUsers.find((u) => u.role === 'planner')!;
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: base },
      body: JSON.stringify({ email: planner.email, password: DEMO_PASSWORD }),
    });
    if (signIn.status !== 200) throw new Error(`bench sign-in failed: ${signIn.status}`);
    const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
    const auth = { cookie };
    const api = `${base}/api/projects/${projectId}`;
    out.push(
      `Load: ${CONNECTIONS} connections, ${DURATION_S} s per figure after ${WARM_UP_S} s not counted; load average before: ${os.loadavg()[0].toFixed(2)} on ${os.availableParallelism()} cores`,
    );

    // The server's very first forecast (its process just started: code not yet optimised), printed
    // beside the figure with a limit, which is a running server's first answer after a change.
    const forecastMs = async () => {
      const t = performance.now();
      const res = await fetch(`${api}/forecast`, { headers: auth });
      await res.arrayBuffer();
      if (res.status !== 200) throw new Error(`forecast answered ${res.status}`);
      return performance.now() - t;
    };
    const coldMs = await forecastMs();
    // Forecast after a change: the first answer computes (once), later ones come from the cache.
    // A server on site has computed many: the median of five changes, each answered once.
    const afterChange: number[] = [];
    for (let i = 0; i < 5; i++) {
      await db.execute(sql`update projects set name = name where id = ${projectId}`);
      afterChange.push(await forecastMs());
    }
    const firstMs = afterChange.sort((a, b) => a - b)[2];
    const { rows } = await db.execute<{ n: number }>(sql`select count(*)::int as n from positions where project_id = ${projectId}`);
    out.push(
      `Forecast after a change, first answer (computes, ${rows[0].n} positions): ${firstMs.toFixed(0)} ms, median of 5 changes (${afterChange.map((m) => m.toFixed(0)).join(', ')}) — target ≤ 150 ms (the server's first forecast after its start: ${coldMs.toFixed(0)} ms)`,
    );

    const me = await load(`${base}/api/auth/me`, auth);
    const json = await load(`${bare}/json`);
    out.push(
      `GET /api/auth/me: ${fmt(me)} | bare Express JSON route: ${fmt(json)} | throughput ${pct(me.reqPerS, json.reqPerS)} — target ≥ 40 %`,
    );

    const positions = await load(`${api}/positions`, auth);
    const barePositions = await load(`${bare}/positions`);
    out.push(
      `GET …/positions: ${fmt(positions)} | bare Express + pg, same SQL: ${fmt(barePositions)} | throughput ${pct(positions.reqPerS, barePositions.reqPerS)} (target ≥ 60 %), p95 ${(positions.p95 / barePositions.p95).toFixed(2)}× (target ≤ 1.5×)`,
    );

    const forecast = await load(`${api}/forecast`, auth);
    const bareForecast = await load(`${bare}/forecast`);
    out.push(
      `GET …/forecast: ${fmt(forecast)} | bare Express + pg, the cached row: ${fmt(bareForecast)} | throughput ${pct(forecast.reqPerS, bareForecast.reqPerS)} (target ≥ 60 %), p95 ${(forecast.p95 / bareForecast.p95).toFixed(2)}× (target ≤ 1.5×)`,
    );

    // GET positions while stop plans are computed back to back (each one a 2 km plan of the demo drive).
    let planning = true;
    let plans = 0;
    let planMs = 0;
    // What the load costs the plans: their certificates, and how many the answer time cut short.
    const gapsPercent: number[] = [];
    let cut = 0;
    const planner$ = (async () => {
      while (planning) {
        const p = performance.now();
        const res = await fetch(`${api}/stops/plan`, { headers: auth });
        const body = (await res.json()) as { certificate: { gapPercent: number; cutAfterS: number | null } | null };
        if (res.status !== 200) throw new Error(`stop plan answered ${res.status}`);
        planMs += performance.now() - p;
        plans++;
        if (body.certificate) gapsPercent.push(body.certificate.gapPercent);
        if (body.certificate?.cutAfterS != null) cut++;
      }
    })();
    const during = await load(`${api}/positions`, auth);
    planning = false;
    await planner$;
    out.push(
      `GET …/positions during stop plans (${plans} plans, ${(planMs / Math.max(1, plans)).toFixed(0)} ms each): ${fmt(during)} | p95 ${(during.p95 / positions.p95).toFixed(2)}× idle (target ≤ 2×)`,
      `  those plans under load: certificates at most ${gapsPercent.map((g) => `${g.toFixed(1)} %`).join(', ')} above the cheapest; ${cut} of ${plans} cut short by the answer time`,
    );

    // The sign-in screen's JavaScript as a browser receives it (bytes on the wire, encoded).
    const browser = await launchBrowser();
    try {
      // The page's own scripts; the service worker's background precache of every chunk is not the sign-in page's cost.
      const page = await (await browser.newContext({ serviceWorkers: 'block' })).newPage();
      const scripts: Promise<{ name: string; bytes: number }>[] = [];
      page.on('requestfinished', (req) => {
        if (req.resourceType() === 'script')
          scripts.push(req.sizes().then((s) => ({ name: req.url().replace(/^.*\/assets\//, ''), bytes: s.responseBodySize })));
      });
      await page.goto(`${base}/sign-in`, { waitUntil: 'networkidle' });
      const sizes = (await Promise.all(scripts)).sort((a, b) => b.bytes - a.bytes);
      const kb = sizes.reduce((a, b) => a + b.bytes, 0) / 1000;
      const largest = sizes.slice(0, 3).map((s) => `${s.name} ${(s.bytes / 1000).toFixed(0)} KB`);
      out.push(
        `Sign-in page JavaScript as served: ${kb.toFixed(0)} KB in ${sizes.length} file(s), largest ${largest.join(', ')} — target ≤ 150 KB`,
      );
    } finally {
      await browser.close();
    }
    out.push(`Load average after: ${os.loadavg()[0].toFixed(2)}`);
  } finally {
    app.kill('SIGTERM');
    bareServer.kill('SIGTERM');
  }
  return out;
}
