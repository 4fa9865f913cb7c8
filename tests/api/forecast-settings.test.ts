/**
 * Forecast settings and the wear-fit answer through the API: the prior can be switched off
 * (weight 0), a site factor of 0 is refused with a message that says how to switch the prior off,
 * and every rate says where its cautious P90 comes from. Invented drive (makeStopsDrive: one
 * ground with CAI 4 and no inspections yet).
 */
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { addMember, makeUser, signedInAgent } from '../support/fixtures';
import { makeStopsDrive } from '../support/stops-fixtures';

const app: Express = createApp();
const settings = {
  classFactors: { centre: 0.8, face: 1, gauge: 1.5 },
  gehringSiteFactor: 1,
  priorStrength: 5,
  tipWidthMm: 19,
  overcutMarginMm: 20,
  windowStrokes: 30,
  overrides: {},
};

describe('forecast settings: the prior blend', () => {
  let agent: Awaited<ReturnType<typeof signedInAgent>>;
  let base: string;
  let groundId: string;

  beforeAll(async () => {
    const drive = await makeStopsDrive();
    const planner = await makeUser();
    await addMember(drive.project.id, planner.id, 'planner');
    agent = await signedInAgent(app, planner.email);
    base = `/api/projects/${drive.project.id}`;
    groundId = drive.ground.id;
  });

  it('accepts a prior weight of 0 and keeps the prior for a ground not yet inspected', async () => {
    const put = await agent.put(`${base}/forecast/settings`).send({ ...settings, priorStrength: 0 });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    expect(put.body.priorStrength).toBe(0);
    const fit = await agent.get(`${base}/wear-fit`);
    expect(fit.status).toBe(200);
    const ground = fit.body.grounds.find((g: { id: string }) => g.id === groundId);
    // derived: no inspection in this ground, so nothing to blend — the rate is the prior itself,
    // and its cautious rate the prior plus the margin (DEVELOPERS.md, decision 13).
    expect(ground.rate).toMatchObject({ source: 'prior', siteOnlyRateMmPerKm: null, priorRateMmPerKm: ground.priorMmPerKm });
    expect(ground.cautious).toMatchObject({ p50MmPerKm: ground.priorMmPerKm, cautiousSource: 'prior-margin' });
    expect(ground.cautious.p90MmPerKm).toBeGreaterThan(ground.cautious.p50MmPerKm);
    expect(fit.body).toHaveProperty('relativeScatter');
  });

  it('refuses a site factor of 0 and a negative weight, saying what to do, and changes nothing', async () => {
    const zero = await agent.put(`${base}/forecast/settings`).send({ ...settings, gehringSiteFactor: 0 });
    expect(zero.status).toBe(400);
    expect(zero.body.error.message).toMatch(/prior weight to 0/);
    const negative = await agent.put(`${base}/forecast/settings`).send({ ...settings, priorStrength: -1 });
    expect(negative.status).toBe(400);
    expect(negative.body.error.issues[0]).toMatchObject({ path: 'priorStrength' });
    const now = await agent.get(`${base}/forecast/settings`);
    expect(now.body).toMatchObject({ gehringSiteFactor: 1, priorStrength: 0 });
  });

  it('gives the forecast a cautious source per ground next to P50 and P90', async () => {
    const res = await agent.get(`${base}/forecast`);
    expect(res.status).toBe(200);
    expect(res.body.rates.byGround[groundId]).toMatchObject({ cautiousSource: 'prior-margin' });
  });
});
