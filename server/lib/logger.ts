import pino from 'pino';
import { env } from '../env';

/**
 * Written through pino's asynchronous destination: a request's log line is buffered and written
 * off the request path (pino flushes the buffer when the process exits).
 */
export const logger = pino(
  { level: env().LOG_LEVEL, redact: ['req.headers.cookie', 'res.headers["set-cookie"]'] },
  pino.destination({ sync: false, minLength: 4096 }),
);
