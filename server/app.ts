import { existsSync } from 'node:fs';
import path from 'node:path';
import { csrfSync } from 'csrf-sync';
import express from 'express';
import session from 'express-session';
import helmet from 'helmet';
import { accessTokenRoutes } from './components/access-tokens/access-token.routes';
import { bearerAuth, unlessBearer } from './components/access-tokens/bearer-auth';
import { adminRoutes } from './components/admin/admin.routes';
import { withAuditScope } from './components/audit/audit-scope';
import { atomLibraryRoutes } from './components/atom-libraries/atom-library.routes';
import { configureAccessCaches } from './components/auth/access-cache';
import { configureRunDetailCache, forgetRunDetail } from './components/runs/run-detail-cache';
import { configureListCaches, runsChangedElsewhere } from './db/list-caches';
import { authRoutes } from './components/auth/auth.routes';
import { csrfState } from './components/auth/csrf-state';
import { currentPasswordLimiter } from './components/auth/current-password-limit';
import { createPassport } from './components/auth/passport';
import { createSessionStore } from './components/auth/session-store';
import { fabRoutes } from './components/fab/fab.routes';
import { healthRoutes } from './components/health/health.routes';
import { libraryBuildRoutes } from './components/library-builds/library-build.routes';
import { notificationRoutes } from './components/notifications/notification.routes';
import { notifyRunFinished } from './components/notifications/notification.service';
import { projectRoutes } from './components/projects/project.routes';
import { reviewRoutes } from './components/review/review.routes';
import { revisionRoutes } from './components/revisions/revision.routes';
import { onRunFinished } from './components/runs/run-state';
import { runRoutes } from './components/runs/run.routes';
import { shareLinkRoutes, sharedRoutes } from './components/share-links/share-link.routes';
import { uploadRoutes } from './components/uploads/upload.routes';
import type { AppContext } from './context';
import { apiNotFound, errorHandler } from './lib/error-handler';
import { createInputPool } from './lib/input-pool';
import { limitJsonDepth } from './lib/json-depth';
import { openApiDocument } from './openapi';

/** Builds the Express app (API + built client) around its context; supertest imports this directly. */
export function createApp(ctx: AppContext) {
  const { config, logger } = ctx;
  const inputs = createInputPool(config);
  const app = express();
  app.disable('x-powered-by');
  // No ETag hashed over every API answer (the client never asks conditionally); static files keep their own.
  app.set('etag', false);
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          styleSrc: ["'self'", "'unsafe-inline'"],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          workerSrc: ["'self'", 'blob:'],
          upgradeInsecureRequests: null,
        },
      },
      hsts: config.publicUrl.startsWith('https://'),
    }),
  );
  app.use((req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      logger.debug({ method: req.method, url: req.originalUrl, status: res.statusCode, ms: Math.round(ms) }, 'request');
    });
    next();
  });

  // Before the session: a health check never touches the session store.
  app.use('/api', healthRoutes(ctx, inputs));

  configureAccessCaches(config);
  configureListCaches(config);
  configureRunDetailCache(config);
  const store = createSessionStore(ctx.sequelize, { idleMs: Math.min(config.SESSION_IDLE_HOURS * 3600_000, config.SESSION_MAX_DAYS * 24 * 3600_000), touchIntervalMs: config.SESSION_TOUCH_SECONDS * 1000 });
  app.use(
    session({
      name: 'pw.sid',
      secret: config.SESSION_SECRET,
      store,
      resave: false,
      saveUninitialized: false,
      // The cookie lives until the session's absolute end and is sent once, at sign-in; the idle lifetime is
      // the stored row's (session-store.ts), so answers carry no Set-Cookie of their own.
      rolling: false,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: config.publicUrl.startsWith('https://'),
        maxAge: config.SESSION_MAX_DAYS * 24 * 3600_000,
      },
    }),
  );
  const passport = createPassport(config);
  app.use(passport.initialize());
  app.use(passport.session());

  const { csrfSynchronisedProtection, generateToken } = csrfSync({
    getTokenFromRequest: (req) => req.get('x-csrf-token'),
    ...csrfState(config.publicUrl.startsWith('https://')),
  });

  const api = express.Router();
  api.use(express.json({ limit: `${config.JSON_MAX_KIB}kb`, verify: limitJsonDepth(config.JSON_MAX_DEPTH) }));
  api.use(bearerAuth);
  api.use(withAuditScope(() => ctx.logger));
  api.use(unlessBearer(csrfSynchronisedProtection));
  api.get('/openapi.json', (_req, res) => {
    res.json(openApiDocument(config.publicUrl));
  });
  api.use('/shared', sharedRoutes());
  // One count of wrong current passwords, whichever route checked.
  const passwordChecks = currentPasswordLimiter(config);
  api.use('/access-tokens', accessTokenRoutes(passwordChecks));
  api.use('/auth', authRoutes(ctx, passport as never, generateToken, passwordChecks));
  api.use('/projects/:projectId/revisions', revisionRoutes());
  api.use('/projects/:projectId/uploads', uploadRoutes(ctx, inputs));
  api.use('/projects/:projectId/atom-libraries', atomLibraryRoutes(config, inputs));
  api.use('/projects/:projectId/library-builds', libraryBuildRoutes(ctx));
  api.use('/projects/:projectId', runRoutes(ctx));
  api.use('/projects/:projectId', fabRoutes(ctx));
  api.use('/projects/:projectId', reviewRoutes(ctx));
  api.use('/notifications', notificationRoutes());
  api.use('/projects/:projectId', shareLinkRoutes(ctx));
  api.use('/projects', projectRoutes(ctx));
  api.use('/admin', adminRoutes(ctx));
  api.use(apiNotFound);
  app.use('/api', api);

  const clientDir = path.resolve(config.CLIENT_DIST);
  if (existsSync(path.join(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(path.join(clientDir, 'index.html'));
    });
  }

  app.use(errorHandler(logger));
  // Run workers of other processes change runs (and their projects) without this process's model hooks.
  ctx.runQueue.onUpdate((runId) => {
    runsChangedElsewhere();
    forgetRunDetail(runId);
  });
  onRunFinished((runId, status) => {
    notifyRunFinished(ctx, runId, status).catch((err: unknown) => logger.error({ err, runId }, 'run notification could not be recorded'));
  });
  return { app, sessionStore: store, inputs };
}
