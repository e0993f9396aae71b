import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Browser } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeIdp, type FakeIdp } from '../../idp-fake/index.ts';
import { demoIdentities } from '../../idp-fake/identities.ts';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { User } from '../../server/src/models/index.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { startTestSmtp, tokenFromText } from '../helpers/mail.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

let sequelize: Sequelize;
let server: Server;
let idp: FakeIdp;
let browser: Browser;
let base: string;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;

beforeAll(async () => {
  assertClientBuilt();
  const opened = await openTestDatabase();
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  smtp = await startTestSmtp();
  // the app's address must be known to the identity provider and the other way round: listen first
  server = createServer();
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const spEntityId = `${base}/api/auth/saml/metadata`;
  const acsUrl = `${base}/api/auth/saml/acs`;
  idp = await startFakeIdp({ port: 0, certDir: opened.config.saml.certDir, spAcsUrl: acsUrl, spEntityId });
  const config: AppConfig = {
    ...opened.config,
    clientDir: clientBuildDir,
    publicUrl: base,
    smtp: { ...opened.config.smtp, port: smtp.port },
    mailDir: smtp.mailDir,
    saml: { ...opened.config.saml, entryPoint: idp.ssoUrl, spEntityId, acsUrl, idpIssuer: idp.entityId },
  };
  server.on('request', createApp({ config, sequelize }));
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await idp?.close();
  await smtp?.close();
  await new Promise((r) => server?.close(r));
  await sequelize?.close();
});

async function ssoRoundTrip(identityKey: string) {
  const person = demoIdentities.find((p) => p.key === identityKey)!;
  const page = await browser.newPage();
  await page.goto(base + '/people');
  await page.waitForURL(/\/sign-in\?returnTo=%2Fpeople/);
  await page.getByRole('link', { name: 'Sign in with your organisation' }).click();
  await page.waitForURL((u) => u.href.startsWith(idp.url));
  await page.locator(`#person-${identityKey}`).click();
  await page.waitForURL((u) => u.href.startsWith(base) && !u.pathname.startsWith('/sign-in') && !u.pathname.startsWith('/api'));
  await page.getByText(person.displayName, { exact: true }).first().waitFor();
  return { page, person };
}

describe('signing in in a real browser', () => {
  it('SAML round trip as an administrator: lands on the People screen they asked for', async () => {
    const { page, person } = await ssoRoundTrip('admin');
    expect(new URL(page.url()).pathname).toBe('/people');
    await page.getByRole('heading', { name: 'People', level: 1 }).waitFor();
    const header = await page.locator('header').innerText();
    expect(header).toContain(person.displayName);
    expect(header).toMatch(/Administrator/i);
    const stored = await User.findOne({ where: { email: person.email } });
    expect(stored).toMatchObject({ role: 'admin', samlNameId: person.email });
    await screenshot(page, 'people-after-sso');
    await page.close();
  });

  it('SAML round trip as an editor: signed in, but the People screen says they have no access and its entry is hidden', async () => {
    const { page, person } = await ssoRoundTrip('editor');
    await page.getByRole('heading', { name: /have access to this screen/ }).waitFor();
    expect(await page.getByRole('navigation').getByText('People').count()).toBe(0);
    expect((await User.findOne({ where: { email: person.email } }))?.role).toBe('editor');
    await page.close();
  });

  it('an administrator invites a person from the People screen; the invitation link sets a password and signs them in', async () => {
    const admin = await makePerson('admin');
    const page = await browser.newPage({ bypassCSP: true });
    await signInThroughPage(page, base, admin.email, TEST_PASSWORD);
    // the development mailbox entry appears right after sign-in, without a reload
    await page.getByRole('navigation').getByRole('link', { name: 'Mailbox' }).waitFor();
    await page.getByRole('navigation').getByRole('link', { name: 'People' }).click();
    await page.getByRole('heading', { name: 'People', level: 1 }).waitFor();
    expect(await axeViolations(page)).toEqual([]);
    const invite = page.getByRole('region', { name: /invite/i }).or(page.locator('form').filter({ hasText: /invite/i })).first();
    await invite.getByLabel(/e-mail/i).fill('pip.harrow@people.example');
    await invite.getByLabel(/name/i).fill('Pip Harrow');
    await invite.getByLabel(/role/i).selectOption('archivist');
    await invite.getByRole('button', { name: /invite|send/i }).click();
    await page.getByRole('cell', { name: /pip\.harrow/i }).or(page.getByText('pip.harrow@people.example')).first().waitFor();
    await screenshot(page, 'people-invited');
    await page.close();

    const [mail] = await smtp.messagesTo('pip.harrow@people.example');
    const token = tokenFromText(mail!.text);
    const guest = await browser.newPage();
    await guest.goto(`${base}/welcome?token=${token}`);
    await guest.getByText('Pip Harrow').first().waitFor();
    const pw = guest.getByLabel(/password/i).first();
    await pw.fill('tide tables and tea');
    const confirm = guest.getByLabel(/again|confirm|repeat/i);
    if ((await confirm.count()) > 0) await confirm.first().fill('tide tables and tea');
    await guest.getByRole('button', { name: /password|continue|save|set/i }).first().click();
    await guest.waitForURL((u) => u.pathname === '/');
    expect(await guest.locator('header').innerText()).toContain('Pip Harrow');
    await guest.close();
  });
});
