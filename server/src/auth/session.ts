import type { RequestHandler } from 'express';
import session from 'express-session';
import connectSessionSequelize from 'connect-session-sequelize';
import { csrfSync } from 'csrf-sync';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';

const SequelizeStore = connectSessionSequelize(session.Store);

/** Sessions in MariaDB (table `sessions`), cookie HTTP-only, SameSite=Lax, Secure whenever served over HTTPS. */
export function sessionMiddleware(ctx: AppContext): RequestHandler {
  const store = new SequelizeStore({ db: ctx.sequelize, tableName: 'sessions', modelKey: 'Session', expiration: ctx.config.sessionMaxAgeMs });
  return session({
    name: 'cartouche.sid',
    secret: ctx.config.sessionSecret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: true,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: ctx.config.publicUrl.startsWith('https:'),
      maxAge: ctx.config.sessionMaxAgeMs,
      path: '/',
    },
  });
}

// Synchroniser token pattern (OWASP CSRF Prevention Cheat Sheet): a random token kept in the session,
// echoed by the client in the x-csrf-token header on every state-changing request.
const csrf = csrfSync({ getTokenFromRequest: (req) => req.get('x-csrf-token') ?? undefined });

/** The session's CSRF token, made on first use (and again after the session is rotated). */
export function csrfToken(req: Parameters<RequestHandler>[0]): string {
  return csrf.generateToken(req);
}

export const csrfCheck: RequestHandler = (req, _res, next) => {
  if (csrf.isRequestValid(req)) return next();
  next(
    new HttpProblem(403, 'Missing or stale security token', 'Reload the page and try again: this request did not carry the security token of your session.', {
      type: '/problems/csrf',
    }),
  );
};
