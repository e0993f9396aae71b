import { mkdtempSync, writeFileSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { createTasks } from '../../jobs/src/tasks/index.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Collection, Example, Run } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { startTestSmtp } from '../helpers/mail.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

// The scans are drawn by the demo renderer (the invented Kestrelmouth Harbour Museum); this checks the screen, not accuracy.
let sequelize: Sequelize;
let config: AppConfig;
let server: Server;
let browser: Browser;
let pool: EmbeddingPool;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;
let base: string;
let archivistEmail: string;
let editorEmail: string;
let platesId: number;
let dropFolder: string;
const plates = buildDemoScenario().collections[0]!;

beforeAll(async () => {
  assertClientBuilt();
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-e2e-night-shift-'));
  const opened = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') });
  sequelize = opened.sequelize;
  smtp = await startTestSmtp();
  config = { ...opened.config, smtp: { ...opened.config.smtp, port: smtp.port }, mailDir: smtp.mailDir };
  await resetDatabase(sequelize);
  await makeCollection({ slug: 'quay-photographs', name: 'Quay photographs', medium: 'photograph' });
  const platesCollection = await makeCollection({ slug: 'harbour-plates', name: 'Kestrelmouth harbour plates', medium: plates.medium });
  platesId = platesCollection.id;
  archivistEmail = (await makePerson('archivist', { displayName: 'Morwen Tidewell' })).email;
  editorEmail = (await makePerson('editor', { displayName: 'Pell Ambry' })).email;

  // four new scans and one file that is no scan at all, waiting in a drop folder
  dropFolder = mkdtempSync(join(tmpdir(), 'cartouche-e2e-drop-'));
  for (const item of plates.items.slice(0, 4)) writeFileSync(join(dropFolder, item.fileName), (await renderItemImage(item, plates.medium, { width: 400 })).data);
  writeFileSync(join(dropFolder, 'shelf-notes.jpg'), 'Shelf B12: plates still to be scanned.\n');

  // one subject with a model made from two drawings, so the run has something to suggest and rebuild
  const lighthouse = await makeSubject(platesCollection, { prefLabel: 'lighthouse' });
  const storage = new Storage(config.storageDir);
  const embedder = await processEmbedder();
  for (const d of plates.items.filter((i) => i.truth.includes('lighthouse')).slice(20, 22)) {
    const key = await storage.put((await renderItemImage(d, plates.medium, { width: 400 })).data);
    const ex = await Example.create({ subjectId: lighthouse.id, medium: 'illustration', origin: 'uploaded', fileKey: key, itemId: null, createdBy: null });
    await embedStoredFile(embedder, storage, { type: 'example', id: ex.id }, key);
  }
  await synthesizeSubjectModel(sequelize, embedder, lighthouse.id, { mode: 'from-examples' }, null);

  pool = await EmbeddingPool.start(1);
  const app = createApp({ config: { ...config, clientDir: clientBuildDir }, sequelize });
  server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  browser = await launchBrowser();
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await new Promise((r) => server?.close(r));
  pool?.dispose();
  await smtp?.close();
  await sequelize?.close();
});

const flat = async (page: Page, text: Promise<string>) => (await text).replace(/\s+/g, ' ');
const runDetail = (page: Page, runId: number) => page.getByRole('region', { name: `Run ${runId}`, exact: true });
// stages are found by what they do; their order is the server's
const stage = (page: Page, runId: number, label: string) => runDetail(page, runId).getByRole('listitem', { name: new RegExp(`^Stage \\d: ${label}$`) });

describe('the Night shift screen in a real browser', () => {
  it('an archivist sets the schedule, runs the night shift now, follows the run to its end and cancels a second one', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1280, height: 900 } });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(base) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) external.push(r.url());
    });
    await signInThroughPage(page, base, archivistEmail, TEST_PASSWORD);
    await page.getByRole('navigation').getByRole('link', { name: 'Night shift' }).click();
    await page.getByRole('heading', { name: 'Night shift', level: 1 }).waitFor();
    expect(await page.getByRole('main').innerText()).toContain('a suggestion is not a description until a person approves it');
    await page.getByLabel('Collection').selectOption({ label: 'Kestrelmouth harbour plates (0 items)' });
    expect(new URL(page.url()).searchParams.get('collection')).toBe(String(platesId));
    await page.getByText('Kestrelmouth harbour plates has had no run yet.').waitFor();

    // a bad schedule is refused, and the refusal stands beside the field, which takes the focus
    const cron = page.getByLabel('Schedule', { exact: true });
    const inWords = page.locator('p', { hasText: 'In words:' });
    await cron.fill('every night at two');
    expect(await flat(page, inWords.innerText())).toContain('not a common form; the night shift follows every night at two as written');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await expect.poll(() => cron.getAttribute('aria-invalid')).toBe('true');
    const cronError = await cron.evaluate((el) => document.getElementById(el.getAttribute('aria-describedby')!.split(' ')[0]!)?.textContent);
    expect(cronError).toContain('Not a cron expression');
    expect(await cron.evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await axeViolations(page)).toEqual([]);
    expect((await Collection.findByPk(platesId))?.scheduleCron).not.toBe('every night at two');

    // a good one, read back in words, saved with a time zone and the drop folder
    await cron.fill('30 1 * * 1-5');
    expect(await flat(page, inWords.innerText())).toMatch(/In words: on weekdays at 01:30, .+ time/);
    await page.getByLabel('Time zone').selectOption('Europe/London');
    expect(await flat(page, inWords.innerText())).toBe('In words: on weekdays at 01:30, Europe/London time');
    await page.getByLabel('Run on this schedule').check();
    await page.getByLabel('Drop folder').fill(dropFolder);
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByRole('status').filter({ hasText: 'Settings saved.' }).waitFor();
    expect(await cron.getAttribute('aria-invalid')).toBeNull();
    const saved = await Collection.findByPk(platesId);
    expect(saved).toMatchObject({ scheduleCron: '30 1 * * 1-5', scheduleTimezone: 'Europe/London', scheduleEnabled: true, dropFolder });

    // Run now: the run appears, queued, and a second press is refused in words
    await page.getByRole('button', { name: 'Run now' }).click();
    await page.getByRole('status').filter({ hasText: /^Run \d+ is queued\./ }).waitFor();
    const first = await Run.findOne({ where: { collectionId: platesId }, order: [['id', 'DESC']] });
    expect(first?.status).toBe('queued');
    const runId = first!.id;
    expect(new URL(page.url()).searchParams.get('run')).toBe(String(runId));
    const listed = page.getByRole('region', { name: 'All runs' }).getByRole('listitem').first();
    expect(await flat(page, listed.innerText())).toMatch(new RegExp(`^Run ${runId} Queued Started by hand · Asked for .+, not started yet Shown in detail$`));
    const waiting = await flat(page, runDetail(page, runId).innerText());
    expect(waiting).toContain('Waiting for a worker to pick it up.');
    expect(waiting).toContain('Counts None yet: the counts begin when the run starts.');
    await page.getByRole('button', { name: 'Run now' }).click();
    const refusal = page.getByRole('alert').filter({ hasText: 'A run is already under way' });
    await refusal.waitFor();
    expect(await flat(page, refusal.innerText())).toContain(`Run ${runId} for Kestrelmouth harbour plates is queued; wait for it to finish or cancel it.`);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'night-shift-queued-1280');

    // the worker takes the run; the page, asking every two seconds, follows it to its end
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });
    expect(await worker.runOnce()).toBe(true);
    expect((await Run.findByPk(runId))?.status).toBe('succeeded');
    await runDetail(page, runId).getByText('Finished: every stage is done or had nothing to do.').waitFor({ timeout: 10_000 });
    const labels = ['Take in the drop folder', 'Read the new scans', 'Suggest subjects', 'Rebuild subject models', 'Mail the digest'];
    for (const label of labels) expect(await flat(page, stage(page, runId, label).innerText())).toContain('Done');
    expect(await flat(page, stage(page, runId, labels[0]!).innerText())).toContain('5 of 5');
    expect(await stage(page, runId, labels[0]!).getByRole('progressbar').getAttribute('aria-valuenow')).toBe('100');
    expect(await flat(page, stage(page, runId, labels[4]!).innerText())).toContain('Note: sent to 1 editor(s)');
    // text is read (on by default) after the suggestions are made, before the digest
    const reading = runDetail(page, runId).getByRole('listitem', { name: 'Stage 5: Find text in the scans', exact: true });
    expect(await flat(page, reading.innerText())).toMatch(/Done .*Note: 4 read, \d+ mostly text/);
    await runDetail(page, runId).getByRole('listitem', { name: 'Stage 6: Mail the digest', exact: true }).waitFor();
    const detail = await flat(page, runDetail(page, runId).innerText());
    expect(detail).toMatch(/Scans taken in 4 /);
    expect(detail).toMatch(/Files refused 1 /);
    expect(detail).toMatch(/shelf-notes\.jpg: .*not .*(image|JPEG|PNG)/i);
    expect(detail).toContain('Problems met None.');
    expect(await flat(page, listed.innerText())).toMatch(new RegExp(`^Run ${runId} Succeeded Started by hand · Started .+ · took .+ 4 scans taken in · 0 duplicates passed over · 1 file refused · 4 scans read`));
    // the end was announced politely, once, with the stages that finished since the page last looked
    const told = await page.getByRole('status').filter({ hasText: `Run ${runId} succeeded.` }).innerText();
    expect(told).toContain('Mail the digest: done.');
    // with no run under way any more, the refusal no longer holds and is gone
    expect(await refusal.count()).toBe(0);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'night-shift-succeeded-1280');

    // a second run, cancelled after a question in words, never starts
    await page.getByRole('button', { name: 'Run now' }).click();
    await page.getByRole('status').filter({ hasText: new RegExp(`^Run ${runId + 1} is queued\\.`) }).waitFor();
    await runDetail(page, runId + 1).getByRole('button', { name: 'Cancel this run…' }).click();
    const question = page.getByRole('group', { name: /^Cancel run \d+\?/ });
    expect(await flat(page, question.innerText())).toContain(`Cancel run ${runId + 1}? It will not start.`);
    expect(await question.evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await axeViolations(page)).toEqual([]);
    await page.getByRole('button', { name: 'No, let it go on' }).click();
    expect(await page.getByRole('button', { name: 'Cancel this run…' }).evaluate((el) => el === document.activeElement)).toBe(true);
    await page.getByRole('button', { name: 'Cancel this run…' }).click();
    await page.getByRole('button', { name: 'Yes, cancel the run' }).click();
    await runDetail(page, runId + 1).getByText('Cancelled on request').waitFor();
    expect(await page.evaluate(() => document.activeElement?.textContent)).toBe(`Run ${runId + 1}`);
    await page.getByRole('status').filter({ hasText: `Run ${runId + 1} cancelled.` }).waitFor();
    expect((await Run.findByPk(runId + 1))?.status).toBe('cancelled');
    expect(await runDetail(page, runId + 1).getByRole('button', { name: 'Cancel this run…' }).count()).toBe(0);
    expect(await worker.runOnce()).toBe(true); // its job is taken and let go without doing anything
    expect((await Run.findByPk(runId + 1))?.status).toBe('cancelled');

    // the first run again, from the list, by keyboard
    await page.getByRole('link', { name: `Run ${runId}`, exact: true }).focus();
    await page.bringToFront();
    await page.keyboard.press('Enter');
    await runDetail(page, runId).waitFor();
    expect(new URL(page.url()).searchParams.get('run')).toBe(String(runId));

    await page.setViewportSize({ width: 390, height: 844 });
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'night-shift-archivist-390');
    expect(external).toEqual([]);
    await page.close();
  }, 120_000);

  it('an editor sees the settings and the runs, but no Run now, Cancel or settings form', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1280, height: 900 } });
    await signInThroughPage(page, base, editorEmail, TEST_PASSWORD);
    await page.getByRole('navigation').getByRole('link', { name: 'Night shift' }).click();
    await page.getByRole('heading', { name: 'Night shift', level: 1 }).waitFor();
    await page.getByLabel('Collection').selectOption({ label: 'Kestrelmouth harbour plates (4 items)' });
    const runs = page.getByRole('region', { name: 'All runs' }).getByRole('listitem');
    await expect.poll(() => runs.count()).toBe(2);
    expect(await flat(page, runs.nth(0).innerText())).toMatch(/^Run \d+ Cancelled Started by hand · Asked for .+, never started Shown in detail$/);
    expect(await flat(page, runs.nth(1).innerText())).toContain('Succeeded');
    const settings = await flat(page, page.getByRole('region', { name: 'Settings' }).innerText());
    expect(settings).toContain('Runs On weekdays at 01:30 (Europe/London time)');
    expect(settings).toContain(`Drop folder ${dropFolder}`);
    expect(await page.getByRole('button', { name: 'Run now' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Save settings' }).count()).toBe(0);
    expect(await page.getByLabel('Schedule', { exact: true }).count()).toBe(0);
    // open the run that succeeded: its stages, but no way to cancel anything
    await runs.nth(1).getByRole('link').click();
    const succeeded = Number(new URL(page.url()).searchParams.get('run'));
    await runDetail(page, succeeded).getByText('Finished: every stage is done or had nothing to do.').waitFor();
    expect(await page.getByRole('button', { name: /Cancel/ }).count()).toBe(0);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'night-shift-editor-1280');
    await page.setViewportSize({ width: 390, height: 844 });
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'night-shift-editor-390');
    await page.close();
  }, 60_000);
});
