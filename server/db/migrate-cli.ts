import { loadDotEnv } from '../env';
import { runMigrations } from './migrate';

loadDotEnv();
const url = process.env.DATABASE_URL;
if (!url) {
  console.error('Set DATABASE_URL (or use `npm start`, which starts a local PostgreSQL and migrates it).');
  process.exit(1);
}
await runMigrations(url);
console.log('Migrations applied.');
