import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { AuditEvent, UserToken } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { startTestSmtp, tokenFromText } from '../helpers/mail.ts';
import { TEST_PASSWORD, makePerson, signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  smtp = await startTestSmtp();
  config = { ...config, smtp: { ...config.smtp, port: smtp.port }, mailDir: smtp.mailDir };
});
afterAll(async () => {
  await smtp.close();
  await sequelize.close();
});
beforeEach(async () => resetDatabase(sequelize));

const app = () => createApp({ config, sequelize });
const sessionCookie = (res: request.Response) => (res.headers['set-cookie'] as unknown as string[] | undefined)?.find((c) => c.startsWith('cartouche.sid='))?.split(';')[0];

describe('local sign-in', () => {
  it('starts anonymous with a CSRF token and the sign-in methods', async () => {
    const res = await request(app()).get('/api/auth/session').expect(200);
    expect(res.body.user).toBeNull();
    expect(res.body.csrfToken).toMatch(/^[0-9a-f]{40,}$/);
    expect(res.body.signIn).toEqual({ local: true, saml: true, samlLoginUrl: '/api/auth/saml/login' });
  });

  it('refuses a state-changing request without the CSRF token (403)', async () => {
    const person = await makePerson('editor');
    const res = await request(app()).post('/api/auth/login').send({ email: person.email, password: TEST_PASSWORD }).expect(403);
    expect(res.body).toMatchObject({ type: '/problems/csrf', status: 403 });
  });

  it('signs in with the right password, rotates the session, sets a hardened cookie, and records it', async () => {
    const person = await makePerson('archivist');
    const agent = request.agent(app());
    const anon = await agent.get('/api/auth/session').expect(200);
    const before = sessionCookie(anon);
    expect(before).toBeTruthy();
    const res = await agent.post('/api/auth/login').set('x-csrf-token', anon.body.csrfToken).send({ email: person.email.toUpperCase(), password: TEST_PASSWORD }).expect(200);
    const after = sessionCookie(res);
    expect(after).toBeTruthy();
    expect(after).not.toBe(before); // session fixation: a new id after sign-in
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('cartouche.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(res.body.user).toMatchObject({ email: person.email, role: 'archivist' });
    expect(res.body.user.permissions).toContain('subjects:write');
    expect(res.body.csrfToken).not.toBe(anon.body.csrfToken);
    const session = await agent.get('/api/auth/session').expect(200);
    expect(session.body.user.email).toBe(person.email);
    expect(await AuditEvent.count({ where: { action: 'sign-in', actorId: person.id } })).toBe(1);
    const [row] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM sessions', { type: 'SELECT' as never });
    expect(Number(row!.n)).toBeGreaterThanOrEqual(1); // sessions live in MariaDB
  });

  it('refuses a wrong password with a 401 problem and records the failure', async () => {
    const person = await makePerson('editor');
    const agent = request.agent(app());
    const { body } = await agent.get('/api/auth/session');
    const res = await agent.post('/api/auth/login').set('x-csrf-token', body.csrfToken).send({ email: person.email, password: 'not the password' }).expect(401);
    expect(res.body).toMatchObject({ title: 'Sign-in failed', detail: 'The e-mail address or the password is not right.' });
    const failed = await AuditEvent.findOne({ where: { action: 'sign-in-failed' } });
    expect(failed?.detail).toMatchObject({ method: 'password', reason: 'wrong-password' });
  });

  it('limits failed attempts per address with a clear 429 and Retry-After', async () => {
    const person = await makePerson('editor');
    const agent = request.agent(app());
    const { body } = await agent.get('/api/auth/session');
    for (let i = 0; i < config.login.maxAttempts; i++) {
      await agent.post('/api/auth/login').set('x-csrf-token', body.csrfToken).send({ email: person.email, password: `wrong ${i}` }).expect(401);
    }
    const res = await agent.post('/api/auth/login').set('x-csrf-token', body.csrfToken).send({ email: person.email, password: TEST_PASSWORD }).expect(429);
    expect(res.body.title).toBe('Too many sign-in attempts');
    expect(res.body.detail).toMatch(/Wait 15 minutes/);
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
  });

  it('refuses a deactivated person even with the right password, and ends their open sessions', async () => {
    const a = app();
    const { agent } = await signIn(a, 'manager');
    const me = await agent.get('/api/auth/session');
    await sequelize.query('UPDATE users SET active = 0 WHERE id = :id', { replacements: { id: me.body.user.id } });
    expect((await agent.get('/api/auth/session')).body.user).toBeNull();
    await agent.get('/api/collections').expect(401);
    const fresh = request.agent(a);
    const { body } = await fresh.get('/api/auth/session');
    const res = await fresh.post('/api/auth/login').set('x-csrf-token', body.csrfToken).send({ email: me.body.user.email, password: TEST_PASSWORD }).expect(401);
    expect(res.body.detail).toMatch(/deactivated/);
  });

  it('signs out', async () => {
    const { agent, csrf } = await signIn(app(), 'editor');
    const res = await agent.post('/api/auth/logout').set('x-csrf-token', csrf).expect(200);
    expect(res.body.csrfToken).toBeTruthy();
    expect((await agent.get('/api/auth/session')).body.user).toBeNull();
  });
});

describe('password reset by e-mail (over the wire to the fake SMTP server)', () => {
  it('mails a single-use link that sets the password and signs the person in', async () => {
    const person = await makePerson('editor');
    const agent = request.agent(app());
    let { body } = await agent.get('/api/auth/session');
    await agent.post('/api/auth/password-reset').set('x-csrf-token', body.csrfToken).send({ email: person.email }).expect(202);
    const [mail] = await smtp.messagesTo(person.email);
    expect(mail?.subject).toBe('Set a new Cartouche password');
    const token = tokenFromText(mail!.text);
    expect(mail!.text).toContain(`${config.publicUrl}/set-password?token=`);
    expect((await UserToken.findOne())?.tokenHash).not.toContain(token); // only the hash is stored

    const info = await agent.get(`/api/auth/tokens/${token}`).expect(200);
    expect(info.body).toMatchObject({ purpose: 'password_reset', email: person.email });
    await agent.post('/api/auth/password').set('x-csrf-token', body.csrfToken).send({ token, password: 'short' }).expect(400);
    const set = await agent.post('/api/auth/password').set('x-csrf-token', body.csrfToken).send({ token, password: 'a brand new passphrase' }).expect(200);
    expect(set.body.user.email).toBe(person.email);
    // single use
    await agent.get(`/api/auth/tokens/${token}`).expect(404);
    ({ body } = await agent.get('/api/auth/session'));
    await agent.post('/api/auth/password').set('x-csrf-token', body.csrfToken).send({ token, password: 'another new passphrase' }).expect(404);
    // the new password works, the old one does not
    const other = request.agent(app());
    const s = await other.get('/api/auth/session');
    await other.post('/api/auth/login').set('x-csrf-token', s.body.csrfToken).send({ email: person.email, password: TEST_PASSWORD }).expect(401);
    await other.post('/api/auth/login').set('x-csrf-token', s.body.csrfToken).send({ email: person.email, password: 'a brand new passphrase' }).expect(200);
  });

  it('answers the same for an unknown address and sends nothing', async () => {
    const agent = request.agent(app());
    const { body } = await agent.get('/api/auth/session');
    const res = await agent.post('/api/auth/password-reset').set('x-csrf-token', body.csrfToken).send({ email: 'nobody@people.example' }).expect(202);
    expect(res.body).toEqual({ sent: true });
    expect(await smtp.messagesTo('nobody@people.example')).toEqual([]);
  });

  it('refuses an expired link', async () => {
    const person = await makePerson('editor');
    const agent = request.agent(app());
    const { body } = await agent.get('/api/auth/session');
    await agent.post('/api/auth/password-reset').set('x-csrf-token', body.csrfToken).send({ email: person.email }).expect(202);
    const token = tokenFromText((await smtp.messagesTo(person.email))[0]!.text);
    await UserToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: person.id } });
    await agent.get(`/api/auth/tokens/${token}`).expect(404);
  });
});
