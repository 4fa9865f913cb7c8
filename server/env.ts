import { existsSync } from 'node:fs';
import { z } from 'zod';

/**
 * Configuration from the environment (and `.env`, loaded by Node's own loader). Read once, on first
 * use, after the start script has filled in DATABASE_URL / SMTP_URL for the local services.
 */
/** Backups (server/services/backup.ts); also read on their own by `npm run backup` / `npm run restore`. */
export const backupEnvSchema = z.object({
  /** Where nightly and manual backups go; copy this folder off the machine (README, "Backups"). */
  BACKUP_DIR: z.string().default('.data/backups'),
  /** Days (that have a backup) whose newest backup is kept. */
  BACKUP_KEEP_DAILY: z.coerce.number().int().min(1, 'BACKUP_KEEP_DAILY must be at least 1').default(14),
  /** ISO weeks (that have a backup) whose newest backup is kept. */
  BACKUP_KEEP_WEEKLY: z.coerce.number().int().min(0).default(8),
});

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  DATABASE_URL: z.string().url({ message: 'DATABASE_URL must be a postgres:// URL' }),
  SMTP_URL: z.string().url({ message: 'SMTP_URL must be an smtp:// URL' }),
  MAIL_FROM: z.string().default('Kerfwise <kerfwise@localhost>'),
  /** The address people open, used in e-mailed links. */
  APP_URL: z.string().url().optional(),
  /** At least 32 characters; every instance behind a load balancer needs the same one. */
  SESSION_SECRET: z.string().min(32, 'SESSION_SECRET must be at least 32 characters'),
  SESSION_HOURS: z.coerce.number().positive().default(12),
  /** Resolved sessions kept in memory, forgotten on PostgreSQL's notice (decision 45); 'off' reads every request's session from the database. */
  SESSION_CACHE: z.enum(['on', 'off'], { message: "SESSION_CACHE must be 'on' or 'off'" }).default('on'),
  /** Set to the number of proxies in front of the app, so client addresses and HTTPS are seen. */
  TRUST_PROXY: z.coerce.number().int().min(0).default(0),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  STORAGE_DIR: z.string().default('.data/storage'),
  ...backupEnvSchema.shape,
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

export function loadDotEnv(file = '.env') {
  if (existsSync(file)) process.loadEnvFile(file);
}

export function env(): Env {
  if (!cached) {
    const parsed = envSchema.safeParse(process.env);
    if (!parsed.success) {
      const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
      throw new Error(`Configuration is not valid:\n${lines}\nSee .env.example.`);
    }
    cached = parsed.data;
  }
  return cached;
}
