// `npm run backup [-- file]`: a consistent dump of Railcall's database (default .data/backups/railcall-<time>.sql.gz).
import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { backup, connectionFromEnv } from './lib/dump.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const file = process.argv[2] ?? join(root, '.data', 'backups', `railcall-${new Date().toISOString().replace(/[:.]/g, '-')}.sql.gz`);
mkdirSync(dirname(file), { recursive: true });
const c = connectionFromEnv(root);
await backup(c, file);
console.log(`[backup] ${c.database} on ${c.host}:${c.port} -> ${file}`);
