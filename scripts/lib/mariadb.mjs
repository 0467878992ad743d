// A private MariaDB instance: own datadir, own socket, loopback only, never port 3306.
// Node built-ins only (runs before `npm ci`). See ../../DEVELOPERS.md for the layout.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, openSync, readFileSync, rmSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createServer } from 'node:net';

const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

/** Unix socket paths are limited to ~107 bytes: fall back to a short path in /tmp. */
function socketPathFor(runDir) {
  const preferred = join(runDir, 'mariadb.sock');
  if (preferred.length < 100) return preferred;
  const digest = createHash('sha256').update(runDir).digest('hex').slice(0, 12);
  return join(tmpdir(), `railcall-${digest}.sock`);
}

/** A free TCP port on loopback, chosen by the kernel. */
export function freePort() {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address();
      server.close(() => resolve(port));
    });
  });
}

export class MariaDb {
  /** @param {{ baseDir: string, port: number }} opts baseDir holds datadir/, run/ and mariadb.err */
  constructor({ baseDir, port }) {
    this.owned = false;
    this.baseDir = baseDir;
    this.port = port;
    this.datadir = join(baseDir, 'datadir');
    this.runDir = join(baseDir, 'run');
    this.socket = socketPathFor(this.runDir);
    this.pidFile = join(this.runDir, 'mariadb.pid');
    this.errorLog = join(baseDir, 'mariadb.err');
  }

  get initialised() {
    return existsSync(join(this.datadir, 'mysql'));
  }

  init() {
    mkdirSync(this.datadir, { recursive: true });
    const result = spawnSync('mariadb-install-db', [
      '--no-defaults', `--datadir=${this.datadir}`, '--user=root',
      '--skip-test-db', '--auth-root-authentication-method=socket',
    ], { encoding: 'utf8' });
    if (result.status !== 0) throw new Error(`mariadb-install-db failed:\n${result.stderr}`);
  }

  /**
   * Starts the instance, or uses the one already running on this datadir. `adoptRunning`: the caller
   * knows nothing else uses it (a leftover of an interrupted run), so this process stops it at the end.
   */
  async start({ adoptRunning = false } = {}) {
    if (!this.initialised) this.init();
    mkdirSync(this.runDir, { recursive: true });
    // Already running: left by an interrupted run, or serving another process. Use it, never stop it.
    if (await this.ping()) {
      this.owned = adoptRunning;
      return;
    }
    this.owned = true;
    const out = openSync(this.errorLog, 'a');
    this.process = spawn('mariadbd', [
      '--no-defaults', `--datadir=${this.datadir}`, '--user=root',
      '--bind-address=127.0.0.1', `--port=${this.port}`, `--socket=${this.socket}`,
      `--pid-file=${this.pidFile}`, `--log-error=${this.errorLog}`, '--skip-name-resolve',
      '--character-set-server=utf8mb4', '--collation-server=utf8mb4_unicode_ci',
      '--innodb-buffer-pool-size=128M', '--max-connections=400',
    ], { stdio: ['ignore', out, out], detached: true }); // own process group: Ctrl-C reaches us, not the database
    this.process.unref();
    let exited = false;
    this.process.on('exit', () => { exited = true; });
    for (let i = 0; i < 300; i++) {
      if (await this.ping()) return;
      if (exited) break;
      await sleep(100);
    }
    const tail = existsSync(this.errorLog) ? readFileSync(this.errorLog, 'utf8').split('\n').slice(-15).join('\n') : '';
    throw new Error(`MariaDB did not start on port ${this.port}. Last lines of ${this.errorLog}:\n${tail}`);
  }

  ping() {
    return new Promise((resolve) => {
      const child = spawn('mariadb-admin', ['--no-defaults', `--socket=${this.socket}`, '-uroot', '--connect-timeout=2', 'ping'], { stdio: 'ignore' });
      child.on('exit', (code) => resolve(code === 0));
      child.on('error', () => resolve(false));
    });
  }

  /** Runs SQL as root over the socket (root authenticates by the Unix user). */
  sql(statements) {
    const result = spawnSync('mariadb', ['--no-defaults', `--socket=${this.socket}`, '-uroot', '--batch'], { input: statements, encoding: 'utf8' });
    if (result.status !== 0) throw new Error(`SQL failed: ${result.stderr}`);
    return result.stdout;
  }

  /** Clean shutdown; waits for the pid file to go (the exited process can linger as a zombie). */
  /** Shuts down the instance this process started; one it found running is left alone. */
  async stop() {
    if (!this.owned || !(await this.ping())) return;
    spawnSync('mariadb-admin', ['--no-defaults', `--socket=${this.socket}`, '-uroot', 'shutdown'], { stdio: 'ignore' });
    for (let i = 0; i < 300 && existsSync(this.pidFile); i++) await sleep(100);
  }

  /** Removes everything this instance wrote (throwaway test instances only). */
  destroy() {
    rmSync(this.baseDir, { recursive: true, force: true });
    if (!this.socket.startsWith(this.runDir)) rmSync(this.socket, { force: true });
  }
}

/** SQL string literal for values we generate ourselves (identifiers and random passwords). */
export function quote(value) {
  return `'${String(value).replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;
}
