import { inject } from 'vitest';

// Before any server module is imported: they read the environment once.
process.env.NODE_ENV = 'test';
process.env.DATABASE_URL = inject('databaseUrl');
process.env.SMTP_URL = inject('smtpUrl');
process.env.SESSION_SECRET = 'test-only-secret-that-is-long-enough-0123456789';
process.env.LOG_LEVEL = process.env.LOG_LEVEL ?? 'silent';
process.env.STORAGE_DIR = process.env.STORAGE_DIR ?? '.data/test-storage';
process.env.APP_URL = 'http://kerfwise.test';
process.env.TRUST_PROXY = '1';
// In-process tests write to the database and ask the app at once; they read every session from it.
// The cache (decision 45) is proven across processes in tests/api/scale-out.test.ts.
process.env.SESSION_CACHE = process.env.SESSION_CACHE ?? 'off';
