import session from 'express-session';
import MySQLStoreFactory from 'express-mysql-session';
import mysql from 'mysql2/promise';
import type { RequestHandler } from 'express';
import type { Config } from '../config';

export const SESSION_COOKIE = 'railcall.sid';

declare module 'express-session' {
  interface SessionData {
    /** When this sign-in began: sign-ins end after an absolute lifetime whatever the activity. */
    signedInAt?: number;
    /** The venue this sign-in acts on (PUT /api/me/venue); checked against the person's roles on every request. */
    venueId?: number;
  }
}

export interface SessionParts {
  middleware: RequestHandler;
  close(): Promise<void>;
}

/** Sign-ins stored in MariaDB (table http_session, made by a migration). */
export function createSessionMiddleware(config: Config): SessionParts {
  const MySQLStore = MySQLStoreFactory(session);
  // Its own small pool, made here so that a Unix socket can be named (the store passes only host and port on).
  const pool = mysql.createPool({
    host: config.db.host,
    port: config.db.port,
    ...(config.db.socketPath ? { socketPath: config.db.socketPath } : {}),
    user: config.db.user,
    password: config.db.password,
    database: config.db.database,
    connectionLimit: 4,
  });
  const store = new MySQLStore({
    createDatabaseTable: false,
    clearExpired: true,
    checkExpirationInterval: 15 * 60 * 1000,
    expiration: config.sessionIdleMs,
    endConnectionOnClose: true,
    schema: { tableName: 'http_session', columnNames: { session_id: 'session_id', expires: 'expires', data: 'data' } },
  }, pool as never);
  const middleware = session({
    name: SESSION_COOKIE,
    secret: config.sessionSecret,
    store,
    resave: false,
    saveUninitialized: false,
    // Idle expiry: every request pushes the end out again.
    rolling: true,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: config.production,
      maxAge: config.sessionIdleMs,
    },
  });
  return { middleware, close: () => store.close() };
}
