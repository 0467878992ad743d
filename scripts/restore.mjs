// `npm run restore -- file`: loads a dump made by scripts/backup.mjs into the database named by
// RAILCALL_DB_NAME (default railcall). Stop the servers first; start them again afterwards (the start grants
// the application account its rights on the restored tables).
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { connectionFromEnv, restore } from './lib/dump.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const file = process.argv[2];
if (!file) {
  console.error('[restore] usage: npm run restore -- <backup file (.sql or .sql.gz)>');
  process.exit(2);
}
const c = connectionFromEnv(root);
await restore(c, file);
console.log(`[restore] ${file} -> ${c.database} on ${c.host}:${c.port}`);
