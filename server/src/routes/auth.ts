import express, { type Request, type Response, type NextFunction } from 'express';
import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import type { Passport } from 'passport';
import type { Strategy as SamlStrategy } from '@node-saml/passport-saml';
import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { ROLE_PERMISSIONS, PUBLIC, can } from '../auth/permissions.ts';
import { SamlRejection } from '../auth/saml.ts';
import { csrfToken } from '../auth/session.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import type { Mailer } from '../mail/mailer.ts';
import type { User } from '../models/index.ts';
import { audit } from '../services/audit.ts';
import { checkPassword, emailSchema, passwordSchema, requestPasswordReset, resolveToken, setPasswordWithToken } from '../services/people.ts';

export function sessionUser(user: User) {
  return { id: user.id, email: user.email, displayName: user.displayName, role: user.role, permissions: [...ROLE_PERMISSIONS[user.role]] };
}

/** A path inside Cartouche to return to after sign-in; anything else (other hosts, `//x`, `/\x`) becomes '/'. */
export function safeReturnPath(value: unknown): string {
  if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\') || value.length > 500) return '/';
  return value;
}

function logIn(req: Request, user: User): Promise<void> {
  // passport ≥ 0.6 regenerates the session here: a new session id on every sign-in (session fixation)
  return new Promise((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
}

async function recordSignIn(req: Request, user: User, method: 'password' | 'saml' | 'token'): Promise<void> {
  await user.update({ lastSignInAt: new Date() });
  await audit({ action: 'sign-in', actorId: user.id, targetType: 'user', targetId: user.id, detail: { method }, ip: req.ip ?? null });
}

const loginBody = z.object({ email: emailSchema, password: z.string().min(1, 'Enter your password.').max(256) });

export function registerAuthRoutes(api: GuardedRouter, ctx: AppContext, passport: InstanceType<typeof Passport>, mailer: Mailer): void {
  const deps = { sequelize: ctx.sequelize, mailer, publicUrl: ctx.config.publicUrl };
  const saml = ctx.config.saml;

  // Failed sign-ins per address and client: a clear 429 once the window's allowance is spent.
  const loginLimiter = rateLimit({
    windowMs: ctx.config.login.windowMs,
    limit: ctx.config.login.maxAttempts,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String((req.body as { email?: unknown } | undefined)?.email ?? '').toLowerCase()}`,
    handler: (_req, res, next, options) => {
      const minutes = Math.ceil(options.windowMs / 60_000);
      res.set('Retry-After', String(Math.ceil(options.windowMs / 1000)));
      next(
        new HttpProblem(429, 'Too many sign-in attempts', `Too many failed sign-ins for this address. Wait ${minutes} minutes and try again, or set a new password with "Forgotten your password?".`, {
          type: '/problems/too-many-attempts',
        }),
      );
    },
  });

  api.route('get', '/auth/session', PUBLIC, (req, res) => {
    const user = req.user;
    res.set('Cache-Control', 'no-store').json({
      user: user ? sessionUser(user) : null,
      csrfToken: csrfToken(req),
      signIn: { local: true, saml: saml.enabled, samlLoginUrl: '/api/auth/saml/login' },
      mailbox: Boolean(user && ctx.config.mailboxEnabled && can(user.role, 'mailbox:read')),
    });
  });

  api.route('post', '/auth/login', PUBLIC, loginLimiter, async (req, res) => {
    const body = parse(loginBody, req.body, 'body');
    const result = await checkPassword(body.email, body.password);
    if (!result.ok) {
      await audit({ action: 'sign-in-failed', targetType: 'user', targetId: result.user?.id, detail: { method: 'password', reason: result.reason, email: body.email }, ip: req.ip ?? null });
      const detail =
        result.reason === 'deactivated'
          ? 'This account has been deactivated. Ask an administrator if you need it again.'
          : 'The e-mail address or the password is not right.';
      throw new HttpProblem(401, 'Sign-in failed', detail, { type: '/problems/sign-in-failed' });
    }
    await logIn(req, result.user);
    await recordSignIn(req, result.user, 'password');
    res.json({ user: sessionUser(result.user), csrfToken: csrfToken(req) });
  });

  api.route('post', '/auth/logout', PUBLIC, async (req, res) => {
    const user = req.user;
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
    if (user) await audit({ action: 'sign-out', actorId: user.id, targetType: 'user', targetId: user.id, ip: req.ip ?? null });
    res.json({ csrfToken: csrfToken(req) });
  });

  api.route('post', '/auth/password-reset', PUBLIC, async (req, res) => {
    const { email } = parse(z.object({ email: emailSchema }), req.body, 'body');
    await requestPasswordReset(deps, email, req.ip ?? null);
    res.status(202).json({ sent: true });
  });

  api.route('get', '/auth/tokens/:token', PUBLIC, async (req, res) => {
    const found = await resolveToken(String(req.params.token));
    if (!found) throw new HttpProblem(404, 'Link not valid', 'This link is unknown, has been used already, or has expired. Ask for a new one.', { type: '/problems/token-invalid' });
    res.set('Cache-Control', 'no-store').json({ purpose: found.token.purpose, email: found.user.email, displayName: found.user.displayName, expiresAt: found.token.expiresAt.toISOString() });
  });

  api.route('post', '/auth/password', PUBLIC, async (req, res) => {
    const body = parse(z.object({ token: z.string().min(1).max(200), password: passwordSchema }), req.body, 'body');
    const user = await setPasswordWithToken(ctx.sequelize, body.token, body.password, req.ip ?? null);
    await logIn(req, user);
    await recordSignIn(req, user, 'token');
    res.json({ user: sessionUser(user), csrfToken: csrfToken(req) });
  });

  if (!saml.enabled) return;

  api.route('get', '/auth/saml/login', PUBLIC, (req: Request, res: Response, next: NextFunction) => {
    const returnTo = safeReturnPath(req.query.returnTo);
    passport.authenticate('saml', { session: false, additionalParams: { RelayState: returnTo } } as object)(req, res, next);
  });

  api.route(
    'post',
    '/auth/saml/acs',
    PUBLIC,
    { csrf: false, because: 'the identity provider posts here cross-site; the signed, audience- and recipient-bound assertion is the proof' },
    express.urlencoded({ extended: false, limit: '512kb' }),
    (req: Request, res: Response, next: NextFunction) => {
      passport.authenticate('saml', { session: false }, (err: unknown, user: User | false) => {
        // the failure is recorded before the browser is sent on, so the record never trails the answer
        const fail = (code: string, reason: string) => {
          audit({ action: 'sign-in-failed', detail: { method: 'saml', reason }, ip: req.ip ?? null })
            .then(() => res.redirect(303, `/sign-in?failure=${code}`))
            .catch(next);
        };
        if (err instanceof SamlRejection) return fail(err.code, err.message);
        if (err || !user) return fail('saml-invalid', err instanceof Error ? err.message : 'no user');
        const relay = safeReturnPath((req.body as { RelayState?: unknown }).RelayState);
        logIn(req, user)
          .then(() => recordSignIn(req, user, 'saml'))
          .then(() => res.redirect(303, relay))
          .catch(next);
      })(req, res, next);
    },
  );

  api.route('get', '/auth/saml/metadata', PUBLIC, (_req, res) => {
    const strategy = (passport as unknown as { _strategy(name: string): SamlStrategy })._strategy('saml');
    const xml = strategy.generateServiceProviderMetadata(null, readFileSync(saml.spCertFile, 'utf8'));
    res.type('application/samlmetadata+xml').send(xml);
  });
}
