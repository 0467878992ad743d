import { createServer, type Server as HttpServer } from 'node:http';
import { existsSync } from 'node:fs';
import { basename, resolve } from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import type { DataSource } from 'typeorm';
import type { Config } from './config';
import type { Logger } from './logger';
import { createSessionMiddleware } from './middleware/session';
import { apiNotFound, errorHandler } from './middleware/error-handler';
import { mountRoutes, type RouteSpec } from './middleware/routes';
import { HttpError } from './middleware/http-error';
import { originGuard } from './middleware/origin';

/** Client files a phone must revalidate on every load (see the static files below). */
const ALWAYS_FRESH = new Set(['sw.js', 'manifest.webmanifest']);
/**
 * The page itself is never stored: a browser keeps no copy of it on disk or in its back-forward cache,
 * so Back after a sign-out cannot bring the previous person's screen back (the client also re-checks
 * who is signed in when a page is shown again from that cache, for browsers that keep it anyway).
 */
const PAGE_CACHE_CONTROL = 'no-store';
import { createPassport } from './features/auth/passport';
import { resetThrottles, signInThrottles } from './features/auth/throttle';
import { authRoutes } from './features/auth/auth.routes';
import { PeopleService } from './features/people/people.service';
import { peopleRoutes } from './features/people/people.routes';
import { ScheduleService } from './features/schedule/schedule.service';
import { scheduleRoutes } from './features/schedule/schedule.routes';
import { PracticeService } from './features/practice/practice.service';
import { practiceRoutes } from './features/practice/practice.routes';
import { PhotoService } from './features/photos/photo.service';
import { photoRoutes } from './features/photos/photo.routes';
import { RecordService } from './features/record/record.service';
import { recordRoutes } from './features/record/record.routes';
import { ScheduleEditor } from './features/schedule/schedule-edit.service';
import { ScheduleCsv } from './features/schedule/schedule-csv';
import { FirstRun } from './features/setup/setup.service';
import { setupRoutes } from './features/setup/setup.routes';
import { VenueCreator } from './features/venue/venue-creator';
import { createIo, endPersonSignIns, endSignIn, venueChosen, type RailcallServer } from './realtime/io';
import { MailQueue } from './features/mail/mail-queue';
import { Mailbox } from './features/mail/mailbox';
import { mailRoutes } from './features/mail/mail.routes';
import { pdfReportRenderer, ReportMailer } from './features/mail/report-mail';
import { SessionsService } from './features/sessions/sessions.service';
import { sessionRoutes } from './features/sessions/sessions.routes';
import { broadcastCommitted, resyncLocalPhones, sessionSocketFeature, stopWatching } from './features/sessions/sessions.handlers';
import { Presence } from './features/sessions/presence';
import { redisAdapter, type RedisClient } from './realtime/redis';
import { ReAlertTimer } from './features/sessions/re-alert';

export interface AppDeps {
  config: Config;
  /** Connected as the application account. */
  db: DataSource;
  logger: Logger;
  /** Connected; given when several server processes share Socket.IO through Redis. */
  redis?: RedisClient;
  /** The one-time first-run code printed at start while no venue exists (server/index.ts); null otherwise. */
  setupCode?: string | null;
}

export interface RailcallApp {
  app: Express;
  httpServer: HttpServer;
  io: RailcallServer;
  /** Every API route, with its access rule (the access test walks this list). */
  routes: RouteSpec[];
  sessions: SessionsService;
  mail: MailQueue;
  /** Starts background work that reads the database (re-alert timers of open sessions). */
  start(): Promise<void>;
  /** Stops taking connections and closes what the app opened (not the DataSource it was given). */
  close(): Promise<void>;
}

/** Builds the app; only server/index.ts listens. Tests start it on port 0 with their own database. */
export function createApp({ config, db, logger, redis, setupCode = null }: AppDeps): RailcallApp {
  const app = express();
  const httpServer = createServer(app);
  const session = createSessionMiddleware(config);
  const mail = new MailQueue(db, config.mail, logger);
  const record = new RecordService(db);
  const people = new PeopleService(db, { queue: mail, config: config.mail });
  const passport = createPassport(people);
  const schedule = new ScheduleService(db);
  const editor = new ScheduleEditor(db, schedule);
  const photos = new PhotoService(db, config.dataDir ?? '.data/files');
  const sessions = new SessionsService(db, schedule, people);
  const presence = new Presence(db, () => io!);
  const reAlerts = new ReAlertTimer(sessions, logger);

  let io: RailcallServer | undefined;
  const firstRun = new FirstRun(db, setupCode);
  const routes: RouteSpec[] = [
    ...setupRoutes(firstRun, people),
    ...authRoutes({
      people,
      venues: new VenueCreator(db),
      passport,
      throttles: signInThrottles(config),
      resetThrottles: resetThrottles(config),
      onSignedOut: (sessionId) => io && endSignIn(io, sessionId),
      onVenueChosen: (sessionId, me) => io && venueChosen(io, sessionId, me.venue),
      onSignedOutEverywhere: (personId) => io && endPersonSignIns(io, personId),
    }),
    ...peopleRoutes(people, {
      onRolesChanged: (personId) => io && stopWatching(io, personId, people),
      onDeactivated: (personId) => io && endPersonSignIns(io, personId),
    }),
    ...scheduleRoutes(schedule, editor, new ScheduleCsv(db, schedule)),
    ...sessionRoutes(sessions, presence),
    ...practiceRoutes(new PracticeService(db, schedule)),
    ...photoRoutes(photos),
    ...recordRoutes(record),
    ...mailRoutes({
      queue: mail,
      people,
      reports: new ReportMailer(db, mail, people, pdfReportRenderer(record)),
      mailbox: config.mail.mailboxDir ? new Mailbox(config.mail.mailboxDir) : null,
    }),
  ];

  app.disable('x-powered-by');
  // Behind a reverse proxy (TLS there): req.secure and req.ip come from X-Forwarded-*, so the
  // Secure cookie is set and sign-in throttles count the phone's address, not the proxy's.
  app.set('trust proxy', config.trustProxy);
  app.use(helmet({
    contentSecurityPolicy: {
      directives: {
        // Plain http on localhost would break under upgrade-insecure-requests.
        upgradeInsecureRequests: config.production ? [] : null,
        // Vue/Quasar inject style attributes at run time.
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:'],
        mediaSrc: ["'self'", 'data:'],
      },
    },
    strictTransportSecurity: config.production,
  }));
  const originPolicy = { publicOrigins: config.publicOrigins, production: config.production };
  // Answers are about whoever is signed in now: never kept. Without this, Chromium answers a Back
  // navigation's GET /api/me from its cache (history loads skip revalidation), and the previous
  // person's screen comes back after a sign-out. Photos set their own private caching.
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  app.use('/api', originGuard(originPolicy));
  // An exported record to check can be large; everything else keeps the small limit.
  app.use('/api/record/verify', express.json({ limit: '20mb' }));
  app.use('/api', express.json({ limit: config.jsonLimit }));
  app.use('/api', session.middleware, passport.session());
  app.use('/api', (req, _res, next) => {
    const startedAt = req.session?.signedInAt;
    if (req.user && startedAt && Date.now() - startedAt > config.sessionAbsoluteMs) {
      req.session.destroy(() => next(new HttpError('unauthenticated', 'Your sign-in has expired. Sign in again.')));
      return;
    }
    next();
  });
  app.use('/api', mountRoutes(routes));
  app.use('/api', apiNotFound);

  const clientDir = config.clientDir ? resolve(config.clientDir) : null;
  if (clientDir && existsSync(resolve(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, {
      index: false,
      maxAge: '1h',
      // The service worker, the manifest and the page must be asked for fresh every time, or a phone
      // keeps an old app shell for an hour after an update (hashed assets can be cached).
      setHeaders: (res, path) => {
        if (ALWAYS_FRESH.has(basename(path))) res.setHeader('Cache-Control', 'no-cache');
        if (basename(path) === 'index.html') res.setHeader('Cache-Control', PAGE_CACHE_CONTROL);
      },
    }));
    // The client routes its own paths: every other GET gets the app.
    app.get('/{*splat}', (_req, res) => res.sendFile(resolve(clientDir, 'index.html'), { headers: { 'Cache-Control': PAGE_CACHE_CONTROL } }));
  }
  app.use(errorHandler(logger, config.jsonLimit));

  const sessionEvents = sessionSocketFeature(sessions, presence, logger);
  io = createIo(httpServer, session.middleware, passport, [sessionEvents], {
    signInLifetimeMs: config.sessionAbsoluteMs,
    origin: originPolicy,
    eventsPerSecond: config.socketEventsPerSecond,
    adapter: redis && redisAdapter(redis),
    loadUser: (personId, venueId) => people.loadUser(personId, venueId),
  });
  // Broadcasts from other processes may have been lost while Redis was away: phones here check what they hold.
  const onRedisBack = () => void resyncLocalPhones(io!, sessions).catch((error) => logger.warn({ err: error }, 'resync after Redis failed'));
  redis?.on('ready', onRedisBack);
  // Broadcast only after commit; then set the session's re-alert timer from its new state.
  sessions.onCommitted((c) => {
    broadcastCommitted(io!, c);
    reAlerts.track(c.sessionId, c.venueId, c.state);
  });

  return {
    app,
    httpServer,
    io,
    routes,
    sessions,
    mail,
    async start() {
      await reAlerts.start();
      mail.start();
      await photos.drawMissing().catch((error: unknown) => logger.warn({ err: error }, 'the demo photos could not be drawn'));
    },
    async close() {
      reAlerts.stop();
      redis?.off('ready', onRedisBack);
      await mail.stop();
      await io.close();
      await sessionEvents.drain();
      if (httpServer.listening) await new Promise<void>((r) => httpServer.close(() => r()));
      await session.close();
      await sessions.close();
    },
  };
}
