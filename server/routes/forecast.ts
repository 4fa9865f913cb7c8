import { and, eq, inArray, sql } from 'drizzle-orm';
import { Router } from 'express';
import {
  forecastQuerySchema,
  forecastSettingsInputSchema,
  type Explanation,
  type Forecast,
  type ForecastSettingsView,
  type WearFitReport,
} from '../../shared/schemas/forecast';
import { db } from '../db/client';
import { forecastSettings, positions } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { badRequest } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { computeWearFit, forecastRates, loadForecastSettings } from '../services/forecast';
import { cachedExplanation, cachedForecast } from '../services/forecast-cache';

export const wearFitRouter = Router({ mergeParams: true });
export const forecastRouter = Router({ mergeParams: true });

/** Fitted wear rates per ground type, where each comes from, the measurements behind them, and sudden failures. */
wearFitRouter.get('/', requireProject('forecast.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const report = await db.transaction((tx) => computeWearFit(tx, projectId));
  const name = new Map(report.grounds.map((g) => [g.id, g.name]));
  // Chart points: inspections whose disc rolled in one ground only, per ground.
  const points = report.observations
    .map((o) => ({ entries: Object.entries(o.rolledKmByGround), o }))
    .filter((x) => x.entries.length === 1)
    .slice(0, 4000)
    .map(({ entries: [[groundTypeId, rolledKm]], o }) => ({ groundTypeId, rolledKm, wearMm: o.wearMm, positionClass: o.positionClass }));
  const cautious = forecastRates(report);
  reply<WearFitReport>(res, 200, {
    grounds: report.grounds.map((g) => ({
      ...g,
      rate: report.fit.rates.find((r) => r.groundTypeId === g.id) ?? null,
      cautious: cautious.byGround[g.id] ?? null,
    })),
    relativeScatter: cautious.relativeScatter,
    residualSdMm: report.fit.residualSdMm,
    residualDof: report.fit.residualDof,
    classFactors: report.fit.classFactors,
    observationCount: report.observations.length,
    failures: report.failures.map((f) => ({ ...f, groundName: name.get(f.groundTypeId) ?? f.groundTypeId })),
    abnormalEvents: report.abnormalEvents,
    points,
    ringDiameterMm: report.ringDiameterMm,
  });
});

/**
 * Every position's change-out forecast, most urgent (cautious P90) first; `positionId` adds how it
 * was made. Answered from the drive's cached forecast (services/forecast-cache.ts) with an ETag
 * that changes only with the drive's data, the code or the hourly refresh; 304 when unchanged.
 */
forecastRouter.get('/', requireProject('forecast.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const { positionId } = forecastQuerySchema.parse(req.query);
  const cached = await cachedForecast(projectId);
  res.set('Cache-Control', 'private, no-cache');
  res.set('ETag', positionId ? cached.etag.replace(/"$/, `-${positionId.slice(0, 8)}"`) : cached.etag);
  if (req.fresh) {
    res.status(304).end();
    return;
  }
  if (!positionId) {
    // The stored text was made by forecastAnswer, typed as Sendable<Forecast> (services/forecast-cache.ts), sent as its UTF-8 made once.
    res.type('application/json').send(cached.bytes);
    return;
  }
  const answer = JSON.parse(cached.body) as Forecast;
  const explanation = (await cachedExplanation(projectId, positionId, cached.dataVersion)) as Explanation | null;
  reply<Forecast>(res, 200, {
    ...answer,
    positions: answer.positions.map((p) => (p.position.positionId === positionId && explanation != null ? { ...p, explanation } : p)),
  });
});

forecastRouter.get('/settings', requireProject('forecast.read'), async (req, res) => {
  reply<ForecastSettingsView>(res, 200, await loadForecastSettings(db, idParam(req.params, 'projectId', 'That project')));
});

forecastRouter.put('/settings', requireProject('forecast.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const input = forecastSettingsInputSchema.parse(req.body);
  const saved = await db.transaction(async (tx) => {
    const keys = Object.keys(input.overrides);
    if (keys.length > 0) {
      const mine = new Set(
        (
          await tx
            .select({ id: positions.id })
            .from(positions)
            .where(and(eq(positions.projectId, projectId), inArray(positions.id, keys)))
        ).map((p) => p.id),
      );
      const foreign = keys.find((k) => !mine.has(k));
      if (foreign)
        throw badRequest(
          `The override for position ${foreign} names no cutter position of this drive. Reload and choose the position again.`,
          [{ path: `overrides.${foreign}`, message: 'Not a position of this drive.' }],
        );
    }
    const before = await loadForecastSettings(tx, projectId);
    const [after] = await tx
      .insert(forecastSettings)
      .values({ projectId, ...input })
      .onConflictDoUpdate({ target: forecastSettings.projectId, set: { ...input, updatedAt: sql`now()` } })
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'forecast_settings', entityId: projectId, action: 'update', before, after });
    return after;
  });
  reply<ForecastSettingsView>(res, 200, saved);
});
