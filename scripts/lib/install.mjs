// Installs what the project needs and the machine lacks. Node built-ins only: this runs before `npm ci`.
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';

/** Debian packages and a file each one provides, so we know whether it is there. */
const DEBIAN_PACKAGES = {
  'mariadb-server': '/usr/sbin/mariadbd',
  chromium: '/usr/bin/chromium',
  // pdftotext reads the session report's PDF back in the tests.
  'poppler-utils': '/usr/bin/pdftotext',
  // Several server processes: the tests start their own Redis and nginx on loopback.
  'redis-server': '/usr/bin/redis-server',
  nginx: '/usr/sbin/nginx',
};

function run(cmd, args, opts = {}) {
  const result = spawnSync(cmd, args, { stdio: 'inherit', ...opts });
  if (result.status !== 0) {
    throw new Error(`${cmd} ${args.join(' ')} failed with exit code ${result.status}`);
  }
}

/** apt-get installs the named Debian packages that are missing (as root; no sudo on these machines). */
export function ensureDebianPackages(names) {
  const missing = names.filter((name) => !existsSync(DEBIAN_PACKAGES[name] ?? `/nonexistent/${name}`));
  if (missing.length === 0) return;
  console.log(`[setup] installing Debian packages: ${missing.join(', ')}`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  run('apt-get', ['update', '-qq'], { env });
  run('apt-get', ['install', '-y', '-qq', ...missing], { env });
}

/** `npm ci` when node_modules is missing or older than the lock file. */
export function ensureNodeModules(root) {
  const marker = join(root, 'node_modules', '.package-lock.json');
  const lock = join(root, 'package-lock.json');
  if (existsSync(marker) && statSync(marker).mtimeMs >= statSync(lock).mtimeMs) return;
  console.log('[setup] installing npm dependencies (npm ci)');
  // --include=dev: the build and the tests need the dev dependencies even under NODE_ENV=production.
  run('npm', ['ci', '--include=dev', '--no-audit', '--no-fund'], { cwd: root });
}

/** Runs a command and returns its standard output, throwing with its error output on failure. */
export function capture(cmd, args, opts = {}) {
  return execFileSync(cmd, args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], ...opts });
}
