import { existsSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import type { AppContext } from './context.ts';
import { HttpProblem, apiNotFound, problemHandler } from './http/problem.ts';
import { logger } from './logger.ts';
import { collectionRoutes } from './routes/collections.ts';
import { healthRoutes } from './routes/health.ts';

/** Builds the Express app (without listening): the API under /api and the client's build with an SPA fallback. */
export function createApp(ctx: AppContext): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: { 'img-src': ["'self'", 'data:', 'blob:'], 'upgrade-insecure-requests': null },
      },
      hsts: ctx.config.publicUrl.startsWith('https:'),
    }),
  );
  app.use(pinoHttp({ logger, autoLogging: { ignore: (req) => req.url === '/api/health' } }));

  const api = express.Router();
  api.use(express.json({ limit: '1mb' }));
  api.use(healthRoutes(ctx));
  api.use(collectionRoutes(ctx));
  api.use(apiNotFound);
  app.use('/api', api);

  const indexHtml = join(ctx.config.clientDir, 'index.html');
  app.use(express.static(ctx.config.clientDir, { index: false, maxAge: '1h', setHeaders: immutableAssets }));
  app.get('/{*splat}', (_req, res, next) => {
    if (!existsSync(indexHtml)) {
      next(new HttpProblem(503, 'Client not built', 'The web client has not been built yet: run `npm run build` (or `npm start`).'));
      return;
    }
    res.set('Cache-Control', 'no-cache').sendFile(indexHtml);
  });
  app.use(problemHandler);
  return app;
}

function immutableAssets(res: express.Response, path: string): void {
  if (path.includes(`${join('/', 'assets', '/')}`)) res.set('Cache-Control', 'public, max-age=31536000, immutable');
}
