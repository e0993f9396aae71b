import { Passport, type Strategy } from 'passport';
import type { AppContext } from '../context.ts';
import { User } from '../models/index.ts';
import { upsertSamlPerson } from '../services/people.ts';
import { audit } from '../services/audit.ts';
import { SamlRejection, createSamlStrategy } from './saml.ts';

/**
 * One passport instance per app (not the global singleton), so tests can build apps side by side.
 * The session holds only the person's id; each request reloads the person and drops a deactivated one.
 */
export function createPassport(ctx: AppContext): InstanceType<typeof Passport> {
  const passport = new Passport();
  passport.serializeUser((user, done) => done(null, user.id));
  passport.deserializeUser((id: unknown, done) => {
    User.findByPk(Number(id)).then(
      (user) => done(null, user && user.active ? user : false),
      (err: unknown) => done(err),
    );
  });
  if (ctx.config.saml.enabled) {
    passport.use(
      'saml',
      createSamlStrategy(ctx.config.saml, async (identity) => {
        const result = await upsertSamlPerson(ctx.sequelize, { ...identity, defaultRole: ctx.config.saml.defaultRole });
        if (result.refused === 'deactivated') {
          await audit({ action: 'sign-in-failed', targetType: 'user', targetId: result.user?.id, detail: { method: 'saml', reason: 'deactivated' } });
          throw new SamlRejection(`${identity.email} is deactivated`, 'saml-deactivated');
        }
        if (result.refused === 'no-role' || !result.user) {
          await audit({ action: 'sign-in-failed', detail: { method: 'saml', reason: 'no-role', email: identity.email, roleValue: identity.roleValue } });
          throw new SamlRejection(`no Cartouche role for ${identity.email} (role attribute: ${identity.roleValue ?? 'none'})`, 'saml-no-role');
        }
        return result.user;
      }) as unknown as Strategy, // passport-saml types its strategy against an older @types/passport
    );
  }
  return passport;
}
