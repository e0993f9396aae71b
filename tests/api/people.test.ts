import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { AuditEvent, User } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { startTestSmtp, tokenFromText } from '../helpers/mail.ts';
import { makePerson, signIn } from '../helpers/people.ts';

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

describe('people admin', () => {
  it('invites by e-mail; the link sets a password and the new person can sign in with their role', async () => {
    const a = app();
    const admin = await signIn(a, 'admin');
    const res = await admin.agent
      .post('/api/people/invitations')
      .set('x-csrf-token', admin.csrf)
      .send({ email: 'New.Editor@People.Example', displayName: 'Nell Fathom', role: 'editor' })
      .expect(201);
    expect(res.body.person).toMatchObject({ email: 'new.editor@people.example', role: 'editor', active: true, signInMethod: 'invited' });
    const [mail] = await smtp.messagesTo('new.editor@people.example');
    expect(mail?.subject).toBe('You are invited to Cartouche');
    expect(mail!.text).toContain(admin.user.displayName);
    const token = tokenFromText(mail!.text);

    const guest = request.agent(a);
    const s = await guest.get('/api/auth/session');
    expect((await guest.get(`/api/auth/tokens/${token}`).expect(200)).body).toMatchObject({ purpose: 'invitation', displayName: 'Nell Fathom' });
    const set = await guest.post('/api/auth/password').set('x-csrf-token', s.body.csrfToken).send({ token, password: 'harbour lights at dusk' }).expect(200);
    expect(set.body.user).toMatchObject({ role: 'editor', permissions: ['collections:read', 'review:write', 'exports:read'] });
    await guest.get('/api/people').expect(403);
    expect(await AuditEvent.count({ where: { action: 'invitation-sent' } })).toBe(1);

    const dup = await admin.agent.post('/api/people/invitations').set('x-csrf-token', admin.csrf).send({ email: 'new.editor@people.example', displayName: 'Again', role: 'editor' }).expect(409);
    expect(dup.body.title).toBe('Already has an account');
  });

  it('validates an invitation at the edge and names each bad field', async () => {
    const admin = await signIn(app(), 'admin');
    const res = await admin.agent.post('/api/people/invitations').set('x-csrf-token', admin.csrf).send({ email: 'not-an-address', displayName: '', role: 'curator' }).expect(400);
    expect(res.body.errors.map((e: { path: string }) => e.path).sort()).toEqual(['displayName', 'email', 'role']);
    expect(await User.count()).toBe(1);
  });

  it('changes a role and deactivates/reactivates, with audit events, and refuses a stale version', async () => {
    const admin = await signIn(app(), 'admin');
    const target = await makePerson('editor');
    const list = await admin.agent.get('/api/people').expect(200);
    const row = list.body.people.find((p: { id: number }) => p.id === target.id);
    const changed = await admin.agent.patch(`/api/people/${target.id}`).set('x-csrf-token', admin.csrf).send({ role: 'archivist', version: row.version }).expect(200);
    expect(changed.body.person.role).toBe('archivist');
    const stale = await admin.agent.patch(`/api/people/${target.id}`).set('x-csrf-token', admin.csrf).send({ active: false, version: row.version }).expect(409);
    expect(stale.body.type).toBe('/problems/version-conflict');
    const off = await admin.agent.patch(`/api/people/${target.id}`).set('x-csrf-token', admin.csrf).send({ active: false, version: changed.body.person.version }).expect(200);
    expect(off.body.person.active).toBe(false);
    await admin.agent.patch(`/api/people/${target.id}`).set('x-csrf-token', admin.csrf).send({ active: true, version: off.body.person.version }).expect(200);
    const actions = (await AuditEvent.findAll({ where: { targetId: String(target.id) }, order: [['id', 'ASC']] })).map((e) => e.action);
    expect(actions).toEqual(['role-changed', 'person-deactivated', 'person-reactivated']);
    const roleEvent = await AuditEvent.findOne({ where: { action: 'role-changed' } });
    expect(roleEvent?.detail).toEqual({ from: 'editor', to: 'archivist' });
    expect(roleEvent?.actorId).toBe(admin.user.id);
  });

  it('keeps at least one active administrator and refuses self-deactivation', async () => {
    const admin = await signIn(app(), 'admin');
    const me = (await admin.agent.get('/api/people')).body.people[0];
    const demote = await admin.agent.patch(`/api/people/${me.id}`).set('x-csrf-token', admin.csrf).send({ role: 'editor', version: me.version }).expect(409);
    expect(demote.body.title).toBe('Last administrator');
    const other = await makePerson('admin');
    await admin.agent.patch(`/api/people/${me.id}`).set('x-csrf-token', admin.csrf).send({ active: false, version: me.version }).expect(409);
    const otherRow = (await admin.agent.get('/api/people')).body.people.find((p: { id: number }) => p.id === other.id);
    await admin.agent.patch(`/api/people/${other.id}`).set('x-csrf-token', admin.csrf).send({ active: false, version: otherRow.version }).expect(200);
  });

  it('resends an invitation only to people who have not signed in', async () => {
    const admin = await signIn(app(), 'admin');
    const res = await admin.agent.post('/api/people/invitations').set('x-csrf-token', admin.csrf).send({ email: 'later@people.example', displayName: 'Later', role: 'manager' }).expect(201);
    await admin.agent.post(`/api/people/${res.body.person.id}/invitation`).set('x-csrf-token', admin.csrf).expect(202);
    const mails = await smtp.messagesTo('later@people.example');
    expect(mails).toHaveLength(2);
    // the first link was replaced by the second
    const [newest, oldest] = mails;
    await admin.agent.get(`/api/auth/tokens/${tokenFromText(oldest!.text)}`).expect(404);
    await admin.agent.get(`/api/auth/tokens/${tokenFromText(newest!.text)}`).expect(200);
    await admin.agent.post(`/api/people/${admin.user.id}/invitation`).set('x-csrf-token', admin.csrf).expect(409);
  });

  it('serves the development mailbox to administrators', async () => {
    const admin = await signIn(app(), 'admin');
    await admin.agent.post('/api/people/invitations').set('x-csrf-token', admin.csrf).send({ email: 'box@people.example', displayName: 'Box', role: 'manager' }).expect(201);
    const list = await admin.agent.get('/api/mailbox').expect(200);
    const msg = list.body.messages.find((m: { to: string[] }) => m.to.includes('box@people.example'));
    const one = await admin.agent.get(`/api/mailbox/${msg.id}`).expect(200);
    expect(one.body.text).toContain('/welcome?token=');
    await admin.agent.get('/api/mailbox/..%2F..%2Fetc%2Fpasswd').expect(400);
  });
});
