// `npm test`: installs what is missing, starts a throwaway MariaDB, runs Vitest then Playwright,
// stops MariaDB and prints `tests: N passed, N failed` (the sum of both runners).
// Node built-ins only until `npm ci` has run. RAILCALL_TEST_ONLY=unit|e2e runs one runner; file filters
// after `--` go to that runner (`RAILCALL_TEST_ONLY=unit npm test -- tests/server/people.test.ts`).
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensureDebianPackages, ensureNodeModules } from './lib/install.mjs';
import { freePort, MariaDb, quote } from './lib/mariadb.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const only = process.env.RAILCALL_TEST_ONLY;
const bin = (name) => join(root, 'node_modules', '.bin', name);
const reportDir = join(root, '.data', 'test-reports');
const filters = process.argv.slice(2);
if (filters.length > 0 && only !== 'unit' && only !== 'e2e') {
  console.error('[test] file filters need RAILCALL_TEST_ONLY=unit or =e2e');
  process.exit(2);
}

// redis-server and nginx: the tests of several server processes start their own on loopback.
ensureDebianPackages(['mariadb-server', 'chromium', 'poppler-utils', 'redis-server', 'nginx']);
ensureNodeModules(root);
rmSync(reportDir, { recursive: true, force: true });
mkdirSync(reportDir, { recursive: true });

const db = new MariaDb({ baseDir: mkdtempSync(join(tmpdir(), 'railcall-test-')), port: await freePort() });
const totals = { passed: 0, failed: 0, skipped: 0 };
let exitCode = 0;

let interrupted = false;
let child = null;
// Ctrl-C or SIGTERM: stop the runner, then still shut the throwaway database down (finally, below).
for (const signal of ['SIGINT', 'SIGTERM']) {
  process.on(signal, () => {
    interrupted = true;
    child?.kill(signal);
  });
}

function run(label, cmd, args, env) {
  if (interrupted) return Promise.resolve(1);
  console.log(`\n[test] ${label}`);
  return new Promise((resolve) => {
    child = spawn(cmd, args, { cwd: root, stdio: 'inherit', env: { ...process.env, NO_COLOR: '1', FORCE_COLOR: '0', ...env } });
    child.on('exit', (code) => { child = null; resolve(code ?? 1); });
    child.on('error', () => { child = null; resolve(1); });
  });
}

function readJson(file) {
  return existsSync(file) ? JSON.parse(readFileSync(file, 'utf8')) : null;
}

try {
  await db.start();
  // One MariaDB for the whole run; every test file makes (and drops) its own database with this account.
  const password = randomBytes(18).toString('base64url');
  db.sql(`CREATE USER 'railcall_test'@'127.0.0.1' IDENTIFIED BY ${quote(password)};
          GRANT ALL PRIVILEGES ON *.* TO 'railcall_test'@'127.0.0.1' WITH GRANT OPTION;`);
  const env = {
    RAILCALL_TEST_DB_HOST: '127.0.0.1',
    RAILCALL_TEST_DB_PORT: String(db.port),
    RAILCALL_TEST_DB_USER: 'railcall_test',
    RAILCALL_TEST_DB_PASSWORD: password,
  };

  if (only !== 'e2e') {
    const file = join(reportDir, 'vitest.json');
    const status = await run('unit and API tests (Vitest)', bin('vitest'), ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${file}`, ...filters], env);
    const report = readJson(file);
    if (report) {
      totals.passed += report.numPassedTests;
      totals.failed += report.numFailedTests;
      totals.skipped += report.numPendingTests + (report.numTodoTests ?? 0);
    }
    // A runner that crashed, wrote no report, or ran nothing is a failure, never a quiet green.
    if (!report || report.numTotalTests === 0 || (status !== 0 && report.numFailedTests === 0)) totals.failed += 1;
    if (status !== 0) exitCode = 1;
  }

  if (only !== 'unit') {
    const built = await run('building the client for end-to-end tests', bin('vite'), ['build', '--logLevel', 'warn'], {});
    if (built !== 0) { totals.failed += 1; exitCode = 1; }
    const file = join(reportDir, 'playwright.json');
    const status = built !== 0 ? 1 : await run('end-to-end tests (Playwright, Debian chromium)', bin('playwright'),
      ['test', '-c', 'e2e/playwright.config.ts', '--reporter=list,json', ...filters], { ...env, PLAYWRIGHT_JSON_OUTPUT_NAME: file });
    const report = readJson(file);
    if (report) {
      totals.passed += report.stats.expected + report.stats.flaky;
      totals.failed += report.stats.unexpected;
      totals.skipped += report.stats.skipped;
    }
    const ran = report ? report.stats.expected + report.stats.unexpected + report.stats.flaky : 0;
    if (built === 0 && (!report || ran === 0 || (status !== 0 && report.stats.unexpected === 0))) totals.failed += 1;
    if (status !== 0) exitCode = 1;
  }
} catch (error) {
  console.error(`[test] ${error.stack ?? error}`);
  totals.failed += 1;
  exitCode = 1;
} finally {
  await db.stop();
  db.destroy();
}

if (totals.failed > 0 || interrupted) exitCode = 1;
console.log(`\ntests: ${totals.passed} passed, ${totals.failed} failed${totals.skipped ? `, ${totals.skipped} skipped` : ''}`);
process.exit(exitCode);
