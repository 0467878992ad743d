// `npm run dev`: the private MariaDB and the API server (restarted on change by tsx watch),
// with Vite's dev server on http://localhost:5173 proxying /api and /socket.io to it.
import { spawn } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
// The API part is `npm start` without the production build; Vite serves the client.
const api = spawn(process.execPath, [join(root, 'scripts', 'start.mjs')], {
  cwd: root, stdio: 'inherit', env: { ...process.env, RAILCALL_SKIP_BUILD: '1' },
});
const vite = spawn(join(root, 'node_modules', '.bin', 'vite'), [], { cwd: root, stdio: 'inherit' });
const stop = () => { vite.kill('SIGTERM'); api.kill('SIGTERM'); };
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
api.on('exit', () => vite.kill('SIGTERM'));
