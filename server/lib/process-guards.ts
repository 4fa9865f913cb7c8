/**
 * Last-resort handlers for the server process (DEVELOPERS.md, decision 33). Every job and
 * background task catches its own failures; these catch what slipped through anyway:
 * - an unhandled promise rejection is logged and the server keeps serving (the request or task it
 *   belonged to has already failed on its own; nothing shared is left half-changed by it);
 * - an uncaught exception caused by a lost database or network connection is logged and the
 *   server keeps serving (the pools drop such connections and open new ones);
 * - any other uncaught exception is logged and the process exits with code 1: its state is no
 *   longer trustworthy, and the supervisor (systemd `Restart=always`, README) starts a fresh one.
 */
import { isDatabaseUnavailable } from '../db/client';
import { logger } from './logger';

let installed = false;

export function installProcessGuards(): void {
  if (installed) return;
  installed = true;
  process.on('unhandledRejection', (reason) => {
    logger.error({ err: reason }, 'unhandled promise rejection; the server keeps running');
  });
  process.on('uncaughtException', (err, origin) => {
    if (isDatabaseUnavailable(err)) {
      logger.error({ err: err.message, origin }, 'lost a database connection outside a request; the server keeps running');
      return;
    }
    logger.fatal({ err, origin }, 'uncaught exception; exiting so the supervisor starts a clean process');
    logger.flush?.();
    process.exit(1);
  });
}
