import { z } from 'zod';

/** The only reader of process.env. Everything else receives a Config. */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  RAILCALL_PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  RAILCALL_HOST: z.string().default('0.0.0.0'),
  RAILCALL_DB_HOST: z.string().default('127.0.0.1'),
  RAILCALL_DB_PORT: z.coerce.number().int().min(1).max(65535).default(3407),
  /** A Unix socket of a MariaDB on this host: used instead of host and port when set (no TCP stack on each write). */
  RAILCALL_DB_SOCKET: z.string().min(1).optional(),
  RAILCALL_DB_NAME: z.string().regex(/^[A-Za-z0-9_]+$/).default('railcall'),
  RAILCALL_DB_USER: z.string().default('railcall_app'),
  RAILCALL_DB_PASSWORD: z.string().default(''),
  RAILCALL_DB_OWNER_USER: z.string().default('railcall_owner'),
  RAILCALL_DB_OWNER_PASSWORD: z.string().default(''),
  RAILCALL_SESSION_SECRET: z.string().min(16, 'RAILCALL_SESSION_SECRET must be at least 16 characters'),
  RAILCALL_CLIENT_DIR: z.string().default('dist'),
  RAILCALL_DATA_DIR: z.string().default('.data/files'),
  /** Seed the demo venue (with its published demo passwords) into an empty database. Off in production unless set. */
  RAILCALL_SEED_DEMO: z.enum(['0', '1']).optional(),
  /** The mail server. Without a host, mail waits in the queue (status "queued") until one is set. */
  RAILCALL_SMTP_HOST: z.string().optional(),
  RAILCALL_SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(587),
  /** 1: TLS from the first byte (port 465); 0: plain, upgraded with STARTTLS when the server offers it. */
  RAILCALL_SMTP_SECURE: z.enum(['0', '1']).default('0'),
  RAILCALL_SMTP_USER: z.string().optional(),
  RAILCALL_SMTP_PASSWORD: z.string().optional(),
  RAILCALL_MAIL_FROM: z.string().default('Railcall <railcall@localhost>'),
  /** The local fake mail server's folder (npm start, tests): the development-only mailbox page reads it. */
  RAILCALL_MAILBOX_DIR: z.string().optional(),
  RAILCALL_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'silent']).default('info'),
  /** Redis for Socket.IO between several server processes (redis://127.0.0.1:6379). Unset: one process, no Redis. */
  RAILCALL_REDIS_URL: z.string().url().optional(),
  /**
   * The address(es) people open Railcall at, comma-separated (e.g. https://rail.example.org): requests
   * from other origins are refused, and links in mails start with the first one.
   */
  RAILCALL_PUBLIC_URL: z.string().optional(),
  /** Express "trust proxy": hops to trust (a number), or addresses/subnets, comma-separated. Unset: none. */
  RAILCALL_TRUST_PROXY: z.string().optional(),
});

/** Origins (scheme://host[:port]) from a comma list of URLs; a URL that does not parse is a start-up error. */
function parseOrigins(list: string): string[] {
  return list.split(',').map((s) => s.trim()).filter(Boolean).map((url) => {
    const parsed = URL.parse(url);
    if (!parsed || !/^https?:$/.test(parsed.protocol)) throw new Error(`RAILCALL_PUBLIC_URL: "${url}" is not an http(s) address`);
    return parsed.origin;
  });
}

/** Express's trust proxy setting: a hop count, or a list of addresses and subnets. */
function parseTrustProxy(value: string | undefined): number | string[] | false {
  if (value === undefined || value.trim() === '' || value === '0' || value === 'false') return false;
  if (/^\d+$/.test(value.trim())) return Number(value.trim());
  return value.split(',').map((s) => s.trim()).filter(Boolean);
}

export interface DbConfig {
  host: string;
  port: number;
  /** Set for a MariaDB on this host: its Unix socket, in place of host and port. */
  socketPath?: string;
  database: string;
  user: string;
  password: string;
}

export interface SmtpConfig {
  host: string;
  port: number;
  secure: boolean;
  user?: string;
  password?: string;
}

export interface MailConfig {
  /** null: no mail server set; messages stay queued. */
  smtp: SmtpConfig | null;
  from: string;
  publicUrl: string;
  /** The fake mail server's folder, read by the mailbox page; always null in production. */
  mailboxDir: string | null;
  /** How often the sender looks for due messages. */
  pollMs: number;
  /** Back-off after a failed try: base doubled per try, capped. */
  retryBaseMs: number;
  retryMaxMs: number;
  /** After this many tries a message is marked failed (kept, and can be sent again by hand). */
  maxAttempts: number;
  inviteDays: number;
  resetMinutes: number;
}

export interface Config {
  production: boolean;
  port: number;
  host: string;
  db: DbConfig;
  /** The account that owns the schema: runs migrations and grants the app account its rights. */
  dbOwner: DbConfig;
  sessionSecret: string;
  /** Idle and absolute lifetimes of a sign-in. A show day is long; a forgotten phone should not stay in. */
  sessionIdleMs: number;
  sessionAbsoluteMs: number;
  /** Failed sign-ins allowed per window, per account and per address. */
  signInThrottle: { windowMs: number; perAccount: number; perAddress: number };
  jsonLimit: string;
  /**
   * Origins a browser may call the API and open sockets from. A request that names another origin
   * (the Origin header), or that a browser marks cross-site (Sec-Fetch-Site), is refused.
   */
  publicOrigins: string[];
  /** Express "trust proxy": set when a reverse proxy (TLS at the proxy) forwards to this process. */
  trustProxy: number | string[] | false;
  /** Socket events one socket may send per second before it is answered "slow down". */
  socketEventsPerSecond: number;
  clientDir: string | null;
  /** Files Railcall keeps (photos of hangs), under `photos/`; kept apart from the database's own folder. */
  dataDir?: string;
  logLevel: 'fatal' | 'error' | 'warn' | 'info' | 'debug' | 'silent';
  seedDemo: boolean;
  /** Set when several server processes share the real-time layer through Redis. */
  redisUrl: string | null;
  mail: MailConfig;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const e = envSchema.parse(env);
  const db = { host: e.RAILCALL_DB_HOST, port: e.RAILCALL_DB_PORT, database: e.RAILCALL_DB_NAME, ...(e.RAILCALL_DB_SOCKET ? { socketPath: e.RAILCALL_DB_SOCKET } : {}) };
  return {
    production: e.NODE_ENV === 'production',
    port: e.RAILCALL_PORT,
    host: e.RAILCALL_HOST,
    db: { ...db, user: e.RAILCALL_DB_USER, password: e.RAILCALL_DB_PASSWORD },
    dbOwner: { ...db, user: e.RAILCALL_DB_OWNER_USER, password: e.RAILCALL_DB_OWNER_PASSWORD },
    sessionSecret: e.RAILCALL_SESSION_SECRET,
    sessionIdleMs: 8 * 60 * 60 * 1000,
    sessionAbsoluteMs: 16 * 60 * 60 * 1000,
    signInThrottle: { windowMs: 15 * 60 * 1000, perAccount: 5, perAddress: 30 },
    jsonLimit: '32kb',
    publicOrigins: e.RAILCALL_PUBLIC_URL
      ? parseOrigins(e.RAILCALL_PUBLIC_URL)
      : [`http://localhost:${e.RAILCALL_PORT}`, `http://127.0.0.1:${e.RAILCALL_PORT}`],
    trustProxy: parseTrustProxy(e.RAILCALL_TRUST_PROXY),
    socketEventsPerSecond: 20,
    clientDir: e.RAILCALL_CLIENT_DIR,
    dataDir: e.RAILCALL_DATA_DIR,
    logLevel: e.RAILCALL_LOG_LEVEL,
    seedDemo: e.RAILCALL_SEED_DEMO ? e.RAILCALL_SEED_DEMO === '1' : e.NODE_ENV !== 'production',
    redisUrl: e.RAILCALL_REDIS_URL ?? null,
    mail: {
      smtp: e.RAILCALL_SMTP_HOST
        ? { host: e.RAILCALL_SMTP_HOST, port: e.RAILCALL_SMTP_PORT, secure: e.RAILCALL_SMTP_SECURE === '1', user: e.RAILCALL_SMTP_USER, password: e.RAILCALL_SMTP_PASSWORD }
        : null,
      from: e.RAILCALL_MAIL_FROM,
      publicUrl: (e.RAILCALL_PUBLIC_URL?.split(',')[0]?.trim() || `http://localhost:${e.RAILCALL_PORT}`).replace(/\/+$/, ''),
      mailboxDir: e.NODE_ENV === 'production' ? null : (e.RAILCALL_MAILBOX_DIR ?? null),
      pollMs: 2000,
      retryBaseMs: 5000,
      retryMaxMs: 10 * 60 * 1000,
      maxAttempts: 20,
      inviteDays: 7,
      resetMinutes: 60,
    },
  };
}
