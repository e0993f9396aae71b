import { readFileSync } from 'node:fs';
import { mkdtempSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Browser, Page } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exportTasks } from '../../jobs/src/tasks/export-build.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { LedgerMailSetting } from '../../server/src/models/index.ts';
import { startRun } from '../../server/src/services/runs.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem } from '../helpers/fixtures.ts';
import { seedLedger, type LedgerSeed } from '../helpers/ledger-seed.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let server: Server;
let browser: Browser;
let base: string;
let seed: LedgerSeed;
let worker: NightShiftWorker;

beforeAll(async () => {
  assertClientBuilt();
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-e2e-ledger-'));
  const opened = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') });
  sequelize = opened.sequelize;
  config = opened.config;
  await resetDatabase(sequelize);
  seed = await seedLedger(sequelize, config);
  // a second collection, half done, so the coverage chart has two lines
  const quay = await makeCollection({ slug: 'quay-photographs', name: 'Quay photographs', medium: 'photograph' });
  for (let i = 0; i < 4; i++) {
    const item = await makeItem(quay, { state: i < 2 ? 'approved' : 'new', approvedAt: i < 2 ? new Date(`2026-11-${10 + i * 7}T09:00:00Z`) : null });
    await sequelize.query('UPDATE items SET created_at = :at WHERE id = :id', { replacements: { at: new Date('2026-10-20T09:00:00Z'), id: item.id } });
  }
  await startRun(sequelize, seed.collection.id, 'manual', null);
  await sequelize.query('INSERT INTO second_reviews (item_id, reviewer_id, first_reviewer_id, judgements) VALUES (:item, :second, :first, :judgements)', {
    replacements: {
      item: seed.items[0]!.id,
      second: seed.editors[1].id,
      first: seed.editors[0].id,
      judgements: JSON.stringify([
        { subjectId: seed.subjects.engraving.id, present: true, subjectModelId: null },
        { subjectId: seed.subjects.lighthouse.id, present: true, subjectModelId: null },
        { subjectId: seed.subjects.storm.id, present: true, subjectModelId: null },
        { subjectId: seed.subjects.pier.id, present: false, subjectModelId: null },
      ]),
    },
  });
  worker = new NightShiftWorker({ sequelize, tasks: exportTasks({ config }) });
  const app = createApp({ config: { ...config, clientDir: clientBuildDir }, sequelize });
  server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  browser = await launchBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await new Promise((r) => server?.close(r));
  await sequelize?.close();
});

const flat = async (text: Promise<string>) => (await text).replace(/\s+/g, ' ');
const section = (page: Page, name: string) => page.getByRole('region', { name, exact: true });

describe('the Ledger screen in a real browser', () => {
  it('a manager reads the charts (as pictures with words and as tables), builds and downloads a CSV, and moves the weekly mail', async () => {
    const manager = await makePerson('manager', { displayName: 'Hale Quayside II' });
    const page = await browser.newPage({ bypassCSP: true, locale: 'en-GB', viewport: { width: 1280, height: 900 }, acceptDownloads: true });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(base) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) external.push(r.url());
    });
    await signInThroughPage(page, base, manager.email, TEST_PASSWORD);
    await page.getByRole('navigation').getByRole('link', { name: 'Ledger' }).click();
    await page.getByRole('heading', { name: 'Ledger', level: 1 }).waitFor();
    expect(await flat(page.getByRole('main').innerText())).toContain('not a statement of conformance');
    await page.getByLabel('Collection', { exact: true }).selectOption({ label: 'Harbour plates (6 items)' });

    // coverage: a picture named by its heading and its summary in words
    const coverage = page.getByRole('img', { name: /^Coverage over time Share of each collection’s items/ });
    await coverage.waitFor();
    expect(await coverage.getAttribute('aria-labelledby')).toBeTruthy();
    const summary = await flat(section(page, 'Coverage over time').locator('p').first().innerText());
    expect(summary).toContain('Harbour plates 66.7% (4 of 6)');
    expect(summary).toContain('Quay photographs 50% (2 of 4)');

    // the chart is reachable by keyboard, and the arrow keys walk its weeks (the tooltip shows the figures)
    await page.getByLabel('Collection', { exact: true }).focus();
    let reached = false;
    for (let i = 0; i < 40 && !reached; i++) {
      await page.keyboard.press('Shift+Tab');
      reached = await coverage.evaluate((el) => el === document.activeElement);
    }
    expect(reached).toBe(true);
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => section(page, 'Coverage over time').locator('.recharts-tooltip-wrapper').innerText()).toMatch(/week of/);

    // the same figures as a table, opened from the keyboard
    const tableToggle = page.getByText('Figures as a table: coverage over time');
    await tableToggle.focus();
    await page.keyboard.press('Enter');
    const lastWeek = section(page, 'Coverage over time').getByRole('row', { name: /week of 30 November 2026/ });
    expect(await flat(lastWeek.innerText())).toMatch(/66\.7% \(4 of 6\).*50% \(2 of 4\)/);

    const throughput = await flat(section(page, 'Review throughput').locator('p').first().innerText());
    expect(throughput).toContain('4 in all');
    const precision = await flat(section(page, 'Suggestion precision by subject').locator('p').first().innerText());
    expect(precision).toContain('lighthouse 66.7% (2 of 3)');
    const agreement = await flat(section(page, 'Editor agreement').innerText());
    expect(agreement).toMatch(/Morwen Tidewell and Ilse Brackwater 1 [−-]0\.33 poor \(less than chance\), few items: read with care/);
    expect(await flat(section(page, 'Last night-shift runs').innerText())).toMatch(/Run \d+ ?, started by hand Queued/);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'ledger-dashboard-1280');

    // a CSV of last week, built by the worker and downloaded
    const exportsRegion = section(page, 'Exports');
    await exportsRegion.getByLabel(/Items \(\.csv\)/).check();
    await exportsRegion.getByLabel('First day').fill('2026-11-23');
    await exportsRegion.getByLabel('Last day').fill('2026-11-29');
    await exportsRegion.getByRole('button', { name: 'Build the file' }).click();
    await page.getByRole('status').filter({ hasText: 'Items (CSV) for 2026-11-23 to 2026-11-29 is asked for' }).waitFor();
    expect(await flat(exportsRegion.getByRole('listitem').first().innerText())).toContain('Waiting for a worker');
    expect(await worker.runOnce()).toBe(true);
    const link = exportsRegion.getByRole('link', { name: 'Download items-harbour-plates-2026-11-23-to-2026-11-29.csv' });
    await link.waitFor({ timeout: 10_000 });
    await page.getByRole('status').filter({ hasText: 'Items (CSV) for 2026-11-23 to 2026-11-29 is ready to download.' }).waitFor();
    const [download] = await Promise.all([page.waitForEvent('download'), link.click()]);
    const rows = parse(readFileSync((await download.path())!), { bom: true, columns: true }) as Array<Record<string, string>>;
    expect(rows.map((r) => r.Identifier).sort()).toEqual(['KHM-P-0001', 'KHM-P-0002', 'KHM-P-0003', 'KHM-P-0004', 'KHM-P-0005', 'KHM-P-0006']);

    // a period that ends before it starts is refused beside the field
    await exportsRegion.getByLabel('First day').fill('2026-11-29');
    await exportsRegion.getByLabel('Last day').fill('2026-11-23');
    await exportsRegion.getByRole('button', { name: 'Build the file' }).click();
    await page.getByRole('alert').filter({ hasText: 'The last day is before the first day.' }).waitFor();
    expect(await exportsRegion.getByLabel('Last day').getAttribute('aria-invalid')).toBe('true');

    // the weekly mail: Friday at 16:00 instead of Monday at 07:00
    const mail = section(page, 'Weekly ledger mail');
    expect(await flat(mail.innerText())).toContain('Every Monday at 07:00 (Europe/London)');
    await mail.getByLabel('Day').selectOption({ label: 'Friday' });
    await mail.getByLabel('Hour').selectOption({ label: '16:00' });
    await mail.getByRole('button', { name: 'Save the mail settings' }).click();
    await mail.getByRole('status').filter({ hasText: 'Saved. Every Friday at 16:00 (Europe/London)' }).waitFor();
    expect(await LedgerMailSetting.findByPk(seed.collection.id)).toMatchObject({ enabled: true, weekday: 5, hour: 16 });
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'ledger-exports-1280');

    await page.setViewportSize({ width: 390, height: 844 });
    await page.getByRole('heading', { name: 'Ledger', level: 1 }).scrollIntoViewIfNeeded();
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'ledger-390');
    expect(external).toEqual([]);
    await page.close();
  });

  it('an editor sees the figures and the mail in words, without the form to change it', async () => {
    const editor = await makePerson('editor');
    const page = await browser.newPage({ bypassCSP: true, locale: 'en-GB', viewport: { width: 1280, height: 900 } });
    await signInThroughPage(page, base, editor.email, TEST_PASSWORD);
    await page.goto(`${base}/ledger?collection=${seed.collection.id}`);
    const mail = section(page, 'Weekly ledger mail');
    await mail.getByText(/Every Friday at 16:00/).waitFor();
    expect(await mail.getByRole('button').count()).toBe(0);
    expect(await axeViolations(page)).toEqual([]);
    await page.close();
  });
});
