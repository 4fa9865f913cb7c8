import { sql } from 'drizzle-orm';
import { Router } from 'express';
import { db } from '../db/client';

export const healthRouter = Router();

healthRouter.get('/', async (_req, res) => {
  try {
    await db.execute(sql`select 1`);
    res.json({ status: 'ok', database: 'reachable' });
  } catch {
    res.status(503).json({ status: 'unavailable', database: 'unreachable' });
  }
});
