import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Browser } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import { WorkerHeartbeat } from '../../server/src/models/index.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';

let sequelize: Sequelize;
let server: Server;
let browser: Browser;
let base: string;
let managerEmail: string;

beforeAll(async () => {
  assertClientBuilt();
  const opened = await openTestDatabase();
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  const plates = await makeCollection({ slug: 'plates', name: 'Harbour plates', medium: 'engraving' });
  const ship = await makeSubject(plates, { prefLabel: 'sailing ship' });
  await makeSubject(plates, { prefLabel: 'lighthouse' });
  await makeSubject(plates, { prefLabel: 'engraving', kind: 'form' });
  for (let i = 0; i < 3; i++) await makeItem(plates, { state: 'approved', approvedAt: new Date() });
  for (let i = 0; i < 5; i++) await makeSuggestion(await makeItem(plates), ship);
  await makeCollection({ slug: 'photos', name: 'Quay photographs', medium: 'photograph' });
  managerEmail = (await makePerson('manager')).email;
  const now = new Date();
  await WorkerHeartbeat.create({ workerId: 'e2e', hostname: 'e2e', pid: 1, startedAt: now, heartbeatAt: now, stoppedAt: null, currentJobId: null });

  const app = createApp({ config: { ...opened.config, clientDir: clientBuildDir }, sequelize });
  server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await new Promise((r) => server?.close(r));
  await sequelize?.close();
});

describe('the overview in a real browser', () => {
  it('shows each collection with its counts and coverage from the API', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(base) && !r.url().startsWith('data:')) external.push(r.url());
    });
    await signInThroughPage(page, base, managerEmail, TEST_PASSWORD);
    const plates = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Harbour plates' }) });
    await expect.poll(() => plates.count()).toBe(1);
    const text = (await plates.innerText()).replace(/\s+/g, ' ');
    expect(text).toContain('Medium: engraving');
    expect(text).toMatch(/Items 8/);
    expect(text).toMatch(/Subjects 2 plus 1 form/);
    expect(text).toMatch(/Waiting for review 5/);
    expect(text).toContain('37%'); // 3 of 8 approved, rounded down
    expect(text).toContain('Approved on 3 of 8 items');
    const photos = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Quay photographs' }) });
    expect(await photos.innerText()).toContain('No items imported yet');
    expect(await page.getByText(/Night shift running/).count()).toBeGreaterThan(0);
    expect(external).toEqual([]); // fonts, scripts and styles all come from Cartouche itself
    await screenshot(page, 'overview-1280');
    await page.close();
  });

  it('has no WCAG 2.2 A/AA violations found by axe-core, wide and narrow', async () => {
    for (const width of [1280, 390]) {
      // bypassCSP only lets axe-core's inline script in; the app's own CSP forbids inline scripts
      const page = await browser.newPage({ viewport: { width, height: 900 }, bypassCSP: true });
      await signInThroughPage(page, base, managerEmail, TEST_PASSWORD);
      await page.getByRole('heading', { name: 'Harbour plates' }).waitFor();
      const violations = await axeViolations(page);
      expect(violations, JSON.stringify(violations, null, 2)).toEqual([]);
      await screenshot(page, `overview-${width}`);
      await page.close();
    }
  });

  it('can be worked from the keyboard: the first Tab reaches the skip link, which moves focus to the main content', async () => {
    const page = await browser.newPage();
    await signInThroughPage(page, base, managerEmail, TEST_PASSWORD);
    await page.getByRole('heading', { name: 'Harbour plates' }).waitFor();
    await page.reload();
    await page.getByRole('heading', { name: 'Harbour plates' }).waitFor();
    await page.keyboard.press('Tab');
    const focused = await page.evaluate(() => document.activeElement?.textContent?.trim());
    expect(focused).toBe('Skip to main content');
    await page.keyboard.press('Enter');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('main');
    await page.close();
  });

  it('answers an unknown address inside the app with a way home', async () => {
    const page = await browser.newPage();
    await signInThroughPage(page, base, managerEmail, TEST_PASSWORD);
    await page.goto(base + '/no/such/page');
    await expect.poll(() => page.getByRole('link', { name: /overview|home/i }).count()).toBeGreaterThan(0);
    await page.close();
  });
});
