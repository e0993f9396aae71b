import { createHash, randomBytes } from 'node:crypto';
import argon2 from 'argon2';
import { Op, type Sequelize, type Transaction } from 'sequelize';
import { z } from 'zod';
import { HttpProblem } from '../http/problem.ts';
import type { Mailer } from '../mail/mailer.ts';
import { ROLES, User, UserToken, type Role } from '../models/index.ts';
import type { TokenPurpose } from '../models/user-token.ts';
import { audit } from './audit.ts';

export const TOKEN_LIFETIME_MS: Record<TokenPurpose, number> = {
  invitation: 7 * 24 * 3_600_000,
  password_reset: 2 * 3_600_000,
};

// NIST SP 800-63B §3.1.1.2 asks at least 8 characters and allows long passphrases (at least 64);
// Cartouche asks 12 (common practice for staff accounts) and accepts up to 256.
export const passwordSchema = z.string().min(12, 'Use at least 12 characters.').max(256, 'Use at most 256 characters.');
export const emailSchema = z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address like name@example.org.').max(254));
export const roleSchema = z.enum(ROLES);

export interface Person {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  active: boolean;
  signInMethod: 'password' | 'saml' | 'invited';
  lastSignInAt: string | null;
  createdAt: string;
  version: number;
}

export function toPerson(u: User): Person {
  return {
    id: u.id,
    email: u.email,
    displayName: u.displayName,
    role: u.role,
    active: u.active,
    signInMethod: u.samlNameId ? 'saml' : u.passwordHash ? 'password' : 'invited',
    lastSignInAt: u.lastSignInAt ? u.lastSignInAt.toISOString() : null,
    createdAt: u.createdAt.toISOString(),
    version: u.version,
  };
}

const withSecrets = () => User.unscoped();

export async function listPeople(): Promise<Person[]> {
  const users = await withSecrets().findAll({ order: [['displayName', 'ASC']] });
  return users.map(toPerson);
}

export const hashToken = (raw: string): string => createHash('sha256').update(raw).digest('hex');

/** Makes a single-use token for a person; returns the raw token, which only the e-mail ever carries. */
export async function issueToken(userId: number, purpose: TokenPurpose, createdBy: number | null, transaction?: Transaction, now = new Date()): Promise<string> {
  const raw = randomBytes(32).toString('base64url');
  // a new link replaces any earlier unused one of the same purpose
  await UserToken.update({ usedAt: now }, { where: { userId, purpose, usedAt: { [Op.is]: null } }, transaction });
  await UserToken.create(
    { userId, purpose, tokenHash: hashToken(raw), expiresAt: new Date(now.getTime() + TOKEN_LIFETIME_MS[purpose]), usedAt: null, createdBy },
    { transaction },
  );
  return raw;
}

/** The token and its person when the token is known, unused, unexpired and the person active; else null. */
export async function resolveToken(raw: string, opts: { transaction?: Transaction; lock?: boolean; now?: Date } = {}): Promise<{ token: UserToken; user: User } | null> {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(raw)) return null;
  const token = await UserToken.findOne({ where: { tokenHash: hashToken(raw) }, transaction: opts.transaction, lock: opts.lock });
  const now = opts.now ?? new Date();
  if (!token || token.usedAt || token.expiresAt <= now) return null;
  const user = await withSecrets().findByPk(token.userId, { transaction: opts.transaction });
  if (!user || !user.active) return null;
  return { token, user };
}

function linkFor(publicUrl: string, purpose: TokenPurpose, raw: string): string {
  return `${publicUrl}/${purpose === 'invitation' ? 'welcome' : 'set-password'}?token=${raw}`;
}

async function sendTokenMail(mailer: Mailer, publicUrl: string, user: User, purpose: TokenPurpose, raw: string, inviter?: string): Promise<void> {
  const link = linkFor(publicUrl, purpose, raw);
  const hours = TOKEN_LIFETIME_MS[purpose] / 3_600_000;
  const lifetime = hours >= 24 ? `${hours / 24} days` : `${hours} hours`;
  const text =
    purpose === 'invitation'
      ? `Hello ${user.displayName},\n\n${inviter ?? 'An administrator'} has invited you to Cartouche, where your team describes and tags its image collections.\n\nChoose a password here (the link works once, for ${lifetime}):\n${link}\n\nIf you did not expect this message, you can ignore it.\n`
      : `Hello ${user.displayName},\n\nSomeone asked to set a new password for your Cartouche account.\n\nChoose a new password here (the link works once, for ${lifetime}):\n${link}\n\nIf it was not you, ignore this message: your password stays as it is.\n`;
  await mailer.send({ to: user.email, subject: purpose === 'invitation' ? 'You are invited to Cartouche' : 'Set a new Cartouche password', text });
}

export interface ServiceDeps {
  sequelize: Sequelize;
  mailer: Mailer;
  publicUrl: string;
}

export async function invitePerson(
  deps: ServiceDeps,
  input: { email: string; displayName: string; role: Role },
  actor: User,
  ip: string | null,
): Promise<Person> {
  const existing = await withSecrets().findOne({ where: { email: input.email } });
  if (existing) throw new HttpProblem(409, 'Already has an account', `${input.email} already has a Cartouche account.`, { type: '/problems/conflict' });
  const { user, raw } = await deps.sequelize.transaction(async (transaction) => {
    const user = await User.create(
      { email: input.email, displayName: input.displayName, role: input.role, passwordHash: null, samlNameId: null, lastSignInAt: null },
      { transaction },
    );
    const raw = await issueToken(user.id, 'invitation', actor.id, transaction);
    await audit({ action: 'invitation-sent', actorId: actor.id, targetType: 'user', targetId: user.id, detail: { email: user.email, role: user.role }, ip }, transaction);
    return { user, raw };
  });
  await sendTokenMail(deps.mailer, deps.publicUrl, user, 'invitation', raw, actor.displayName).catch((err: unknown) => {
    throw new HttpProblem(502, 'Invitation not delivered', `The account for ${user.email} was created, but the e-mail could not be sent (${(err as Error).message}). Send it again from the people list.`);
  });
  return toPerson((await withSecrets().findByPk(user.id))!);
}

export async function resendInvitation(deps: ServiceDeps, userId: number, actor: User, ip: string | null): Promise<void> {
  const user = await withSecrets().findByPk(userId);
  if (!user) throw new HttpProblem(404, 'Not found', 'No such person.');
  if (user.passwordHash || user.samlNameId || user.lastSignInAt) {
    throw new HttpProblem(409, 'Already signed in', `${user.email} has already signed in; an invitation is not needed.`, { type: '/problems/conflict' });
  }
  if (!user.active) throw new HttpProblem(409, 'Deactivated', 'Reactivate this person before inviting them again.', { type: '/problems/conflict' });
  const raw = await deps.sequelize.transaction(async (transaction) => {
    const raw = await issueToken(user.id, 'invitation', actor.id, transaction);
    await audit({ action: 'invitation-sent', actorId: actor.id, targetType: 'user', targetId: user.id, detail: { email: user.email, resent: true }, ip }, transaction);
    return raw;
  });
  await sendTokenMail(deps.mailer, deps.publicUrl, user, 'invitation', raw, actor.displayName);
}

/** Sends a reset link when an active person has that address; says nothing either way. */
export async function requestPasswordReset(deps: ServiceDeps, email: string, ip: string | null): Promise<void> {
  const user = await withSecrets().findOne({ where: { email } });
  if (!user || !user.active) return;
  const raw = await deps.sequelize.transaction(async (transaction) => {
    const raw = await issueToken(user.id, 'password_reset', null, transaction);
    await audit({ action: 'password-reset-requested', actorId: null, targetType: 'user', targetId: user.id, ip }, transaction);
    return raw;
  });
  await sendTokenMail(deps.mailer, deps.publicUrl, user, 'password_reset', raw);
}

/** Spends a token: sets the password, marks the token used. Only one of two concurrent uses can win. */
export async function setPasswordWithToken(sequelize: Sequelize, raw: string, password: string, ip: string | null): Promise<User> {
  const hash = await argon2.hash(password, { type: argon2.argon2id });
  return sequelize.transaction(async (transaction) => {
    const found = await resolveToken(raw, { transaction, lock: true });
    if (!found) throw new HttpProblem(404, 'Link not valid', 'This link is unknown, has been used already, or has expired. Ask for a new one.', { type: '/problems/token-invalid' });
    await found.token.update({ usedAt: new Date() }, { transaction });
    await found.user.update({ passwordHash: hash }, { transaction });
    await audit({ action: 'password-set', actorId: found.user.id, targetType: 'user', targetId: found.user.id, detail: { via: found.token.purpose }, ip }, transaction);
    return found.user;
  });
}

export type PasswordCheck = { ok: true; user: User } | { ok: false; reason: 'unknown' | 'wrong-password' | 'no-password' | 'deactivated'; user: User | null };

// verifying against a fixed hash when the account is unknown keeps the answer time the same (common practice)
let dummyHash: Promise<string> | null = null;

export async function checkPassword(email: string, password: string): Promise<PasswordCheck> {
  const user = await withSecrets().findOne({ where: { email } });
  if (!user || !user.passwordHash) {
    dummyHash ??= argon2.hash('cartouche-timing-equaliser', { type: argon2.argon2id });
    await argon2.verify(await dummyHash, password).catch(() => false);
    return { ok: false, reason: user ? 'no-password' : 'unknown', user };
  }
  if (!(await argon2.verify(user.passwordHash, password))) return { ok: false, reason: 'wrong-password', user };
  if (!user.active) return { ok: false, reason: 'deactivated', user };
  return { ok: true, user };
}

export async function updatePerson(
  sequelize: Sequelize,
  id: number,
  change: { role?: Role; active?: boolean; version: number },
  actor: User,
  ip: string | null,
): Promise<Person> {
  return sequelize.transaction(async (transaction) => {
    const user = await withSecrets().findByPk(id, { transaction, lock: true });
    if (!user) throw new HttpProblem(404, 'Not found', 'No such person.');
    if (user.version !== change.version) {
      throw new HttpProblem(409, 'Changed meanwhile', `${user.displayName} was changed by someone else meanwhile. The list has the current state; try again.`, { type: '/problems/version-conflict' });
    }
    const losesAdmin = user.role === 'admin' && user.active && ((change.role !== undefined && change.role !== 'admin') || change.active === false);
    if (losesAdmin) {
      const admins = await User.count({ where: { role: 'admin', active: true }, transaction });
      if (admins <= 1) throw new HttpProblem(409, 'Last administrator', 'Cartouche needs at least one active administrator; make someone else an administrator first.', { type: '/problems/conflict' });
    }
    if (change.active === false && user.id === actor.id) {
      throw new HttpProblem(409, 'Cannot deactivate yourself', 'Ask another administrator to deactivate your account.', { type: '/problems/conflict' });
    }
    const before = { role: user.role, active: user.active };
    await user.update({ ...(change.role !== undefined ? { role: change.role } : {}), ...(change.active !== undefined ? { active: change.active } : {}) }, { transaction });
    if (change.role !== undefined && change.role !== before.role) {
      await audit({ action: 'role-changed', actorId: actor.id, targetType: 'user', targetId: user.id, detail: { from: before.role, to: change.role }, ip }, transaction);
    }
    if (change.active !== undefined && change.active !== before.active) {
      await audit({ action: change.active ? 'person-reactivated' : 'person-deactivated', actorId: actor.id, targetType: 'user', targetId: user.id, ip }, transaction);
    }
    return toPerson(user);
  });
}

/**
 * A person arriving by single sign-on: found by NameID, else by e-mail (linking the account), else created
 * with the mapped (or default) role. A mapped role from the assertion wins over the stored one.
 */
export async function upsertSamlPerson(
  sequelize: Sequelize,
  input: { nameId: string; email: string; displayName: string; mappedRole: Role | null; defaultRole: Role | null },
): Promise<{ user: User | null; created: boolean; refused?: 'deactivated' | 'no-role' }> {
  return sequelize.transaction(async (transaction) => {
    let user =
      (await withSecrets().findOne({ where: { samlNameId: input.nameId }, transaction, lock: true })) ??
      (await withSecrets().findOne({ where: { email: input.email }, transaction, lock: true }));
    if (user && !user.active) return { user, created: false, refused: 'deactivated' as const };
    if (!user) {
      const role = input.mappedRole ?? input.defaultRole;
      if (!role) return { user: null, created: false, refused: 'no-role' as const };
      user = await User.create(
        { email: input.email, displayName: input.displayName, role, passwordHash: null, samlNameId: input.nameId, lastSignInAt: new Date() },
        { transaction },
      );
      return { user, created: true };
    }
    await user.update(
      { samlNameId: input.nameId, displayName: input.displayName || user.displayName, lastSignInAt: new Date(), ...(input.mappedRole ? { role: input.mappedRole } : {}) },
      { transaction },
    );
    return { user, created: false };
  });
}
