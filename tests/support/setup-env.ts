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
