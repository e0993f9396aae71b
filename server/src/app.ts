import { existsSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { createPassport } from './auth/passport.ts';
import { csrfCheck, sessionMiddleware } from './auth/session.ts';
import type { AppContext } from './context.ts';
import { HttpProblem, apiNotFound, problemHandler } from './http/problem.ts';
import { GuardedRouter, type RouteRecord } from './http/routes.ts';
import { logger } from './logger.ts';
import { createMailer, type Mailer } from './mail/mailer.ts';
import { registerAuthRoutes } from './routes/auth.ts';
import { registerCollectionRoutes } from './routes/collections.ts';
import { registerDashboardRoutes } from './routes/dashboard.ts';
import { registerExportRoutes } from './routes/exports.ts';
import { registerIiifRoutes } from './routes/iiif.ts';
import { registerHealthRoutes } from './routes/health.ts';
import { registerIntakeRoutes } from './routes/intake.ts';
import { registerMailboxRoutes } from './routes/mailbox.ts';
import { registerPeopleRoutes } from './routes/people.ts';
import { registerRunRoutes } from './routes/runs.ts';
import { registerItemRoutes } from './routes/items.ts';
import { registerReviewRoutes } from './routes/review.ts';
import { registerSubjectRoutes } from './routes/subjects.ts';
import { registerVocabularyRoutes } from './routes/vocabulary.ts';

export interface CartoucheApp extends Express {
  locals: Express['locals'] & { routes: RouteRecord[] };
}

/** Builds the Express app (without listening): the API under /api and the client's build with an SPA fallback. */
export function createApp(ctx: AppContext, opts: { mailer?: Mailer } = {}): CartoucheApp {
  const app = express() as CartoucheApp;
  const mailer = opts.mailer ?? createMailer(ctx.config);
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'img-src': ["'self'", 'data:', 'blob:'],
          // the SAML sign-in ends with a form posted to the identity provider's or our own address
          'form-action': ["'self'", new URL(ctx.config.saml.entryPoint).origin],
          'upgrade-insecure-requests': null,
        },
      },
      hsts: ctx.config.publicUrl.startsWith('https:'),
    }),
  );
  app.use(pinoHttp({ logger, autoLogging: { ignore: (req) => req.url === '/api/health' } }));

  const passport = createPassport(ctx);
  const api = new GuardedRouter('/api', csrfCheck);
  api.router.use(express.json({ limit: '1mb' }));
  api.router.use(sessionMiddleware(ctx));
  api.router.use(passport.initialize());
  api.router.use(passport.session());
  registerHealthRoutes(api, ctx);
  registerAuthRoutes(api, ctx, passport, mailer);
  registerCollectionRoutes(api, ctx);
  registerIntakeRoutes(api, ctx);
  registerSubjectRoutes(api, ctx);
  registerVocabularyRoutes(api, ctx);
  registerRunRoutes(api, ctx);
  registerReviewRoutes(api, ctx);
  registerItemRoutes(api, ctx);
  registerPeopleRoutes(api, ctx, mailer);
  registerMailboxRoutes(api, ctx);
  registerExportRoutes(api, ctx);
  registerIiifRoutes(api, ctx);
  registerDashboardRoutes(api, ctx);
  api.router.use(apiNotFound);
  app.use('/api', api.router);
  app.locals.routes = api.records;

  const indexHtml = join(ctx.config.clientDir, 'index.html');
  app.use(express.static(ctx.config.clientDir, { index: false, maxAge: '1h', setHeaders: immutableAssets }));
  app.get('/{*splat}', (_req, res, next) => {
    if (!existsSync(indexHtml)) {
      next(new HttpProblem(503, 'Client not built', 'The web client has not been built yet: run `npm run build` (or `npm start`).'));
      return;
    }
    // dotfiles: the client folder may sit below a dot folder (e.g. .data/ in tests); the file name is fixed, not user input
    res.set('Cache-Control', 'no-cache').sendFile(indexHtml, { dotfiles: 'allow' });
  });
  app.use(problemHandler);
  return app;
}

function immutableAssets(res: express.Response, path: string): void {
  if (path.includes(`${join('/', 'assets', '/')}`)) res.set('Cache-Control', 'public, max-age=31536000, immutable');
}
