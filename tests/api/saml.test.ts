import { readFileSync } from 'node:fs';
import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { AuditEvent, User } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makePerson } from '../helpers/people.ts';
import { signedResponse, type AssertionSpec } from '../helpers/saml.ts';

let sequelize: Sequelize;
let config: AppConfig;
let idp: { key: string; cert: string };
let sp: { key: string; cert: string };

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  const c = config.saml;
  idp = { key: readFileSync(c.idpCertFile.replace(/\.crt$/, '.key'), 'utf8'), cert: readFileSync(c.idpCertFile, 'utf8') };
  sp = { key: readFileSync(c.spKeyFile, 'utf8'), cert: readFileSync(c.spCertFile, 'utf8') };
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

const spec = (over: Partial<AssertionSpec> = {}): AssertionSpec => ({
  issuer: 'http://127.0.0.1:4312/metadata',
  nameId: 'ada.quayle@people.example',
  audience: config.saml.spEntityId,
  recipient: config.saml.acsUrl,
  attributes: { email: 'ada.quayle@people.example', displayName: 'Ada Quayle', cartoucheRole: 'cartouche-archivist' },
  ...over,
});

async function post(xml: string, relay = '/people', cfg = config) {
  const agent = request.agent(createApp({ config: cfg, sequelize }));
  const res = await agent.post('/api/auth/saml/acs').type('form').send({ SAMLResponse: Buffer.from(xml).toString('base64'), RelayState: relay }).redirects(0);
  const session = await agent.get('/api/auth/session');
  return { res, user: session.body.user as { email: string; role: string } | null };
}

describe('SAML assertion consumer service', () => {
  it('accepts a signed assertion for us, creates the person with the mapped role, and returns to RelayState', async () => {
    const { res, user } = await post(signedResponse(spec(), idp.key, idp.cert));
    expect(res.status).toBe(303);
    expect(res.headers.location).toBe('/people');
    expect(user).toMatchObject({ email: 'ada.quayle@people.example', role: 'archivist' });
    const stored = await User.findOne({ where: { email: 'ada.quayle@people.example' } });
    expect(stored?.samlNameId).toBe('ada.quayle@people.example');
    expect(await AuditEvent.count({ where: { action: 'sign-in', actorId: stored!.id } })).toBe(1);
  });

  it('never redirects off-site through RelayState', async () => {
    const { res } = await post(signedResponse(spec(), idp.key, idp.cert), '//elsewhere.example/phish');
    expect(res.headers.location).toBe('/');
  });

  const refusals: Array<[string, () => string]> = [
    ['a tampered assertion (bad signature)', () => signedResponse(spec(), idp.key, idp.cert).replace('cartouche-archivist', 'cartouche-admin')],
    ['an assertion signed by someone else', () => signedResponse(spec(), sp.key, sp.cert)],
    ['a wrong audience', () => signedResponse(spec({ audience: 'https://other-service.example/sp' }), idp.key, idp.cert)],
    ['an expired assertion (NotOnOrAfter passed)', () => signedResponse(spec({ notBefore: new Date(Date.now() - 3_600_000), notOnOrAfter: new Date(Date.now() - 600_000) }), idp.key, idp.cert)],
    ['an assertion for another recipient', () => signedResponse(spec({ recipient: 'https://other-service.example/acs', destination: config.saml.acsUrl }), idp.key, idp.cert)],
    ['an unsigned response', () => signedResponse(spec(), idp.key, idp.cert).replace(/<Signature[\s\S]*?<\/Signature>/, '')],
  ];
  for (const [what, make] of refusals) {
    it(`refuses ${what}`, async () => {
      const { res, user } = await post(make());
      expect(res.status).toBe(303);
      expect(res.headers.location).toBe('/sign-in?failure=saml-invalid');
      expect(user).toBeNull();
      expect(await User.count()).toBe(0);
      expect(await AuditEvent.count({ where: { action: 'sign-in-failed' } })).toBe(1);
    });
  }

  it('gives an unmapped role value the configured default role, or refuses when the default is none', async () => {
    const volunteer = spec({ attributes: { email: 'wren@people.example', displayName: 'Wren', cartoucheRole: 'cartouche-volunteer' }, nameId: 'wren@people.example' });
    const { user } = await post(signedResponse(volunteer, idp.key, idp.cert));
    expect(user?.role).toBe(config.saml.defaultRole);
    await resetDatabase(sequelize);
    const strict = { ...config, saml: { ...config.saml, defaultRole: null } };
    const refused = await post(signedResponse(volunteer, idp.key, idp.cert), '/', strict);
    expect(refused.res.headers.location).toBe('/sign-in?failure=saml-no-role');
    expect(refused.user).toBeNull();
  });

  it('links an existing local account by e-mail, updates its role from the assertion, and refuses a deactivated one', async () => {
    const local = await makePerson('manager', { email: 'ada.quayle@people.example' });
    const { user } = await post(signedResponse(spec(), idp.key, idp.cert));
    expect(user?.role).toBe('archivist');
    expect((await User.findByPk(local.id))?.samlNameId).toBe('ada.quayle@people.example');
    await User.update({ active: false }, { where: { id: local.id } });
    const again = await post(signedResponse(spec(), idp.key, idp.cert));
    expect(again.res.headers.location).toBe('/sign-in?failure=saml-deactivated');
    expect(again.user).toBeNull();
  });

  it('publishes service provider metadata naming our entity id and assertion consumer service', async () => {
    const res = await request(createApp({ config, sequelize })).get('/api/auth/saml/metadata').expect(200);
    expect(res.headers['content-type']).toMatch(/application\/samlmetadata\+xml/);
    expect(res.text).toContain(`entityID="${config.saml.spEntityId}"`);
    expect(res.text).toMatch(new RegExp(`AssertionConsumerService[^>]+Location="${config.saml.acsUrl.replace(/[.?]/g, '\\$&')}"`));
    expect(res.text).toContain('WantAssertionsSigned="true"');
  });

  it('sends the browser to the identity provider with a signed request', async () => {
    const res = await request(createApp({ config, sequelize })).get('/api/auth/saml/login?returnTo=/people').redirects(0).expect(302);
    const location = new URL(res.headers.location!);
    expect(location.origin + location.pathname).toBe(config.saml.entryPoint);
    expect(location.searchParams.get('SAMLRequest')).toBeTruthy();
    expect(location.searchParams.get('Signature')).toBeTruthy();
    expect(location.searchParams.get('RelayState')).toBe('/people');
  });
});
