import { mkdtempSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Item, SubjectModel, Suggestion } from '../../server/src/models/index.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

// The scans are drawn by the demo renderer (the invented Kestrelmouth Harbour Museum); the test checks the desk, not accuracy.
let sequelize: Sequelize;
let config: AppConfig;
let server: Server;
let browser: Browser;
let base: string;
let editorEmail: string;
let editorId: number;
let managerEmail: string;
let collectionId: number;
const ids: number[] = [];
let sailingShipId: number;
const plates = buildDemoScenario().collections[0]!;

beforeAll(async () => {
  assertClientBuilt();
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-e2e-review-'));
  const opened = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') });
  sequelize = opened.sequelize;
  config = opened.config;
  await resetDatabase(sequelize);
  const c = await makeCollection({ slug: 'harbour-plates', name: 'Kestrelmouth harbour plates', medium: plates.medium });
  collectionId = c.id;
  const editor = await makePerson('editor', { displayName: 'Pell Ambry' });
  editorEmail = editor.email;
  editorId = editor.id;
  managerEmail = (await makePerson('manager', { displayName: 'Wenna Saltmarsh' })).email;

  const engraving = await makeSubject(c, { prefLabel: 'engraving', kind: 'form' });
  await engraving.update({ altTextPhrase: 'an engraving' });
  const lighthouse = await makeSubject(c, { prefLabel: 'lighthouse' });
  await lighthouse.update({ altTextPhrase: 'a lighthouse', altLabels: ['light', 'pier-head light'] });
  const vessel = await makeSubject(c, { prefLabel: 'vessel' });
  await vessel.update({ altTextPhrase: 'a vessel' });
  const ship = await makeSubject(c, { prefLabel: 'sailing ship', broaderId: vessel.id });
  await ship.update({ altTextPhrase: 'a sailing ship', altLabels: ['barque', 'schooner'] });
  sailingShipId = ship.id;
  const model = (subjectId: number) => SubjectModel.create({ subjectId, version: 2, method: 'prototype', embedderId: 'test', dimension: 2, weights: Buffer.alloc(8), madeFrom: {}, calibration: null, metrics: null, active: true, createdBy: null });
  const lighthouseModel = await model(lighthouse.id);
  const vesselModel = await model(vessel.id);
  const engravingModel = await model(engraving.id);

  const storage = new Storage(config.storageDir);
  const withLighthouse = plates.items.filter((i) => i.truth.includes('lighthouse')).slice(0, 2);
  const withShip = plates.items.find((i) => i.truth.includes('sailing-ship') && !i.truth.includes('lighthouse'))!;
  const picks = [withLighthouse[0]!, withShip, withLighthouse[1]!];
  for (const d of picks) {
    const img = await renderItemImage(d, plates.medium, { width: 900 });
    const outcome = await ingestFile({ sequelize, storage, limits: intakeLimits({}) }, { collectionId: c.id, fileName: d.fileName, source: { buffer: img.data }, origin: 'upload' });
    if (outcome.outcome !== 'ingested') throw new Error(JSON.stringify(outcome));
    ids.push(outcome.itemId);
    await Item.update({ caption: d.caption, creator: d.creator, dateText: d.dateText, state: 'suggested' }, { where: { id: outcome.itemId } });
  }
  const propose = (itemId: number, subjectId: number, modelId: number, probability: number) =>
    Suggestion.create({ itemId, subjectId, subjectModelId: modelId, runId: null, score: probability, probability, state: 'proposed', decidedBy: null, decidedAt: null });
  // most uncertain first: 0.55 (item 1), then 0.3 (item 2), then 0.9 (item 3)
  await propose(ids[0]!, lighthouse.id, lighthouseModel.id, 0.55);
  await propose(ids[0]!, engraving.id, engravingModel.id, 0.97);
  await propose(ids[1]!, vessel.id, vesselModel.id, 0.3);
  await propose(ids[2]!, lighthouse.id, lighthouseModel.id, 0.9);
  // item 3 came in with a placeholder alt text from an old catalogue import
  await Item.update({ altText: 'image' }, { where: { id: ids[2]! } });

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
  await sequelize?.close();
});

const focused = (page: Page) => page.evaluate(() => ({ tag: document.activeElement?.tagName ?? '', text: (document.activeElement?.textContent ?? '').trim(), label: document.activeElement?.getAttribute('aria-label') ?? document.activeElement?.id ?? '' }));
const status = (page: Page, text: string | RegExp) => page.getByRole('status').filter({ hasText: text }).waitFor({ timeout: 10_000 });
const heading = (page: Page, identifier: string) => page.getByRole('heading', { level: 2, name: new RegExp(`^${identifier}`) });

describe('the review desk in a real browser', () => {
  it('an editor approves three items with the keyboard alone, adding a subject and fixing an alt text', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1366, height: 1000 } });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(base) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) external.push(r.url());
    });
    await signInThroughPage(page, base, editorEmail, TEST_PASSWORD);
    await page.getByRole('navigation', { name: 'Primary' }).getByRole('link', { name: 'Review desk' }).waitFor();
    await page.goto(`${base}/review?collection=${collectionId}`);
    const [first, second, third] = await Promise.all(ids.map((id) => Item.findByPk(id)));

    // item 1: the desk opens on the most uncertain item, focus on its heading
    await heading(page, first!.identifier).waitFor();
    expect((await focused(page)).tag).toBe('H2');
    const main = await page.getByRole('main').innerText();
    expect(main).toContain('machine proposals, not descriptions, until an editor approves them');
    expect(main).toContain('Cartouche claims no compliance');
    expect(main).toContain('uncertain (55 %)');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'review-desk-item-1366');

    // zoom by keyboard: + in, 0 back to fit
    await page.keyboard.press('+');
    await page.getByRole('group', { name: `Scan of ${first!.identifier}, zoom 150 %` }).waitFor();
    await page.keyboard.press('0');
    await page.getByRole('group', { name: `Scan of ${first!.identifier}, zoom 100 %` }).waitFor();

    // accept the current suggestion (lighthouse), then the draft follows it
    await page.keyboard.press('a');
    await status(page, 'lighthouse: accepted.');
    const alt = page.getByLabel('Alt text (T)');
    await expect.poll(() => alt.inputValue()).toBe(`A lighthouse: ${first!.caption}.`);
    // the help overlay lists the keys; Escape closes it and focus returns to the heading
    await page.keyboard.press('?');
    await page.getByRole('dialog', { name: 'Keyboard and checker help' }).waitFor();
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'review-desk-help-1366');
    await page.keyboard.press('Escape');
    await page.getByRole('dialog').waitFor({ state: 'hidden' });
    await page.keyboard.press('Control+Enter');
    await status(page, `Approved ${first!.identifier}`);

    // item 2: add a subject through the typeahead by an alternative label
    await heading(page, second!.identifier).waitFor();
    await expect.poll(async () => (await focused(page)).tag).toBe('H2');
    await page.keyboard.press('s');
    expect((await focused(page)).tag).toBe('INPUT');
    await page.keyboard.type('barq');
    const option = page.getByRole('listbox').getByRole('option', { name: /sailing ship/ });
    await option.waitFor();
    expect(await option.innerText()).toContain('also called “barque”');
    expect(await option.innerText()).toContain('broader: vessel');
    await screenshot(page, 'review-desk-typeahead-1366');
    await page.keyboard.press('Enter');
    await status(page, `sailing ship added to ${second!.identifier}.`);
    await expect.poll(() => alt.inputValue()).toBe(`A sailing ship: ${second!.caption}.`);
    await page.keyboard.press('Control+Enter');
    await status(page, `Approved ${second!.identifier}; 1 suggestion not accepted recorded as rejected.`);

    // item 3: a placeholder alt text blocks approval until it is fixed; what is typed survives a reload
    await heading(page, third!.identifier).waitFor();
    expect(await page.getByText('Blocks approval: “image” is a placeholder', { exact: false }).count()).toBe(0);
    expect(await page.getByRole('list', { name: 'Checker findings' }).innerText()).toContain('"image" is a placeholder, not a description of the image.');
    await screenshot(page, 'review-desk-checker-error-1366');
    await page.keyboard.press('Control+Enter');
    await status(page, 'Not approved: the checker found a problem that blocks approval.');
    expect((await focused(page)).tag).toBe('TEXTAREA');
    await page.keyboard.press('Control+A');
    await page.keyboard.type('Engraving of the pier-head lighthouse');
    await page.reload();
    await heading(page, third!.identifier).waitFor();
    await expect.poll(() => page.getByLabel('Alt text (T)').inputValue()).toBe('Engraving of the pier-head lighthouse');
    expect(await page.getByRole('main').innerText()).toContain('Restored the text you had not saved');
    await page.keyboard.press('t');
    await page.keyboard.press('End');
    await page.keyboard.type(' at dusk');
    await page.keyboard.press('Control+Enter');
    await status(page, `Approved ${third!.identifier}; 1 suggestion not accepted recorded as rejected. That was the last item of the queue.`);
    await page.getByRole('heading', { name: 'Nothing waits in this queue' }).waitFor();
    await screenshot(page, 'review-desk-queue-empty-1366');

    const approved = await Promise.all(ids.map((id) => Item.findByPk(id)));
    expect(approved.map((i) => [i!.state, i!.approvedBy])).toEqual([
      ['approved', editorId],
      ['approved', editorId],
      ['approved', editorId],
    ]);
    expect(approved[2]!.altText).toBe('Engraving of the pier-head lighthouse at dusk');
    expect((await Suggestion.findOne({ where: { itemId: ids[1]!, subjectId: sailingShipId } }))?.state).toBe('added');
    expect(await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('cartouche:review-draft:')))).toEqual([]);
    expect(external).toEqual([]);
    await page.close();
  });

  it('a manager finds an item in the catalogue by an alternative label and reads its history', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1366, height: 1000 } });
    await signInThroughPage(page, base, managerEmail, TEST_PASSWORD);
    await page.getByRole('navigation', { name: 'Primary' }).getByRole('link', { name: 'Catalogue' }).click();
    await page.getByRole('heading', { name: 'Catalogue', level: 1 }).waitFor();
    await page.getByRole('searchbox', { name: 'Search' }).fill('schooner');
    await page.keyboard.press('Enter');
    await status(page, '1 item found.');
    const second = (await Item.findByPk(ids[1]!))!;
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'catalogue-search-1366');
    await page.getByRole('link', { name: second.identifier }).click();
    await page.getByRole('heading', { name: second.identifier, level: 1 }).waitFor();
    const history = await page.getByRole('region', { name: 'History' }).innerText();
    expect(history).toContain('Pell Ambry added subject “sailing ship”');
    expect(history).toContain('rejected subject “vessel”, answering model version 2');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'catalogue-item-1366');
    await page.close();
  });

  it('another editor reviews an approved item blind, and the catalogue shows the agreement', async () => {
    await sequelize.query('INSERT INTO review_settings (collection_id, double_review_share) VALUES (:id, 1) ON DUPLICATE KEY UPDATE double_review_share = 1', { replacements: { id: collectionId } });
    const other = await makePerson('editor', { displayName: 'Tamsin Rope' });
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1366, height: 1000 } });
    await signInThroughPage(page, base, other.email, TEST_PASSWORD);
    await page.goto(`${base}/review?collection=${collectionId}&mode=second`);
    const first = (await Item.findByPk(ids[0]!))!;
    await page.getByRole('heading', { name: `${first.identifier}: blind second review` }).waitFor();
    const main = await page.getByRole('main').innerText();
    // blind: the machine's proposals, never the first editor's decisions or alt text
    expect(main).not.toContain(first.altText!);
    expect(main).not.toContain('Accepted');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'review-second-review-1366');
    await page.getByRole('checkbox', { name: /^lighthouse/ }).focus();
    await page.keyboard.press('Space');
    await page.keyboard.press('Control+Enter');
    await status(page, `Second review of ${first.identifier} recorded.`);
    await page.close();

    const manager = await browser.newPage({ bypassCSP: true, viewport: { width: 1366, height: 1000 } });
    await signInThroughPage(manager, base, managerEmail, TEST_PASSWORD);
    await manager.goto(`${base}/catalogue?collection=${collectionId}`);
    const card = manager.getByRole('region', { name: 'Agreement between editors' });
    await card.getByRole('table', { name: 'Per pair of editors' }).waitFor();
    // lighthouse: both said yes; engraving (a proposal the first editor left, so rejected): both said no.
    // Over their two judgements the pair agrees fully; one judgement per subject is too few for a kappa.
    expect(await card.getByRole('table', { name: 'Per pair of editors' }).innerText()).toMatch(/Pell Ambry and Tamsin Rope\s+1\s+1\.00 \(almost perfect\)/);
    expect(await card.getByRole('table', { name: 'Per subject' }).innerText()).toMatch(/lighthouse\s+1\s+— \(not enough items\)/);
    expect(await axeViolations(manager)).toEqual([]);
    await screenshot(manager, 'catalogue-agreement-1366');
    await manager.close();
  });

  it('the subject grid decides many items at once by keyboard, and a stale save shows both versions to merge', async () => {
    const storage = new Storage(config.storageDir);
    const lighthouse = (await Suggestion.findOne({ where: { itemId: ids[2]! }, include: ['subject'] }))!.subjectId;
    const lighthouseModel = (await SubjectModel.findOne({ where: { subjectId: lighthouse } }))!;
    const fresh: number[] = [];
    for (const [n, d] of plates.items.filter((i) => i.truth.includes('lighthouse')).slice(2, 5).entries()) {
      const img = await renderItemImage(d, plates.medium, { width: 600 });
      const outcome = await ingestFile({ sequelize, storage, limits: intakeLimits({}) }, { collectionId, fileName: d.fileName, source: { buffer: img.data }, origin: 'upload' });
      if (outcome.outcome !== 'ingested') throw new Error(JSON.stringify(outcome));
      fresh.push(outcome.itemId);
      await Item.update({ caption: d.caption, state: 'suggested' }, { where: { id: outcome.itemId } });
      await Suggestion.create({ itemId: outcome.itemId, subjectId: lighthouse, subjectModelId: lighthouseModel.id, runId: null, score: 0.9 - n * 0.1, probability: 0.9 - n * 0.1, state: 'proposed', decidedBy: null, decidedAt: null });
    }
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1366, height: 1000 } });
    await signInThroughPage(page, base, editorEmail, TEST_PASSWORD);
    await page.goto(`${base}/review?collection=${collectionId}&mode=subjects`);
    await page.getByLabel('Subject', { exact: true }).selectOption({ label: 'lighthouse' });
    await page.getByRole('heading', { name: 'Does it show “lighthouse”?' }).waitFor();
    const groups = page.getByRole('group');
    await page.getByRole('radio', { name: 'Shows it (Y)' }).first().waitFor();
    expect(await page.getByRole('main').innerText()).toContain('very likely (90 %), model version 2');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'review-subject-grid-1366');
    // Y and X on the focused item, Ctrl+Enter saves them together
    const [a, b] = await Promise.all(fresh.slice(0, 2).map((id) => Item.findByPk(id)));
    await groups.filter({ hasText: a!.identifier }).getByRole('radio', { name: 'Shows it (Y)' }).focus();
    await page.keyboard.press('y');
    // Tab leaves a radio group: the next item's choice
    await page.keyboard.press('Tab');
    await page.keyboard.press('x');
    await page.keyboard.press('Control+Enter');
    await status(page, '2 decisions on lighthouse saved.');
    expect((await Suggestion.findOne({ where: { itemId: a!.id, subjectId: lighthouse } }))?.state).toBe('accepted');
    expect((await Suggestion.findOne({ where: { itemId: b!.id, subjectId: lighthouse } }))?.state).toBe('rejected');

    // the second-review list: the share set above, the two items this editor did not approve waiting
    await page.goto(`${base}/review?collection=${collectionId}&mode=second`);
    await page.getByText(/reviews 100\s?% of its items twice/).waitFor();
    expect(await axeViolations(page)).toEqual([]);

    // a stale save: someone else saves the item after this editor opened it
    await page.goto(`${base}/review?collection=${collectionId}`);
    // the only item with a proposal still open comes first
    const open = (await Item.findByPk(fresh[2]!))!;
    await heading(page, open.identifier).waitFor();
    await page.keyboard.press('t');
    await page.keyboard.press('Control+A');
    await page.keyboard.type('Engraving of the light on the breakwater');
    await Item.update({ altText: 'Engraving of a lighthouse in a storm', version: open.version + 1 }, { where: { id: open.id } });
    await page.keyboard.press('Control+S');
    const merge = page.getByRole('alert').filter({ hasText: 'Changed by someone else meanwhile' });
    await merge.waitFor();
    const both = await merge.innerText();
    expect(both).toContain('Engraving of the light on the breakwater');
    expect(both).toContain('Engraving of a lighthouse in a storm');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'review-desk-conflict-1366');
    expect((await Item.findByPk(open.id))?.altText).toBe('Engraving of a lighthouse in a storm');
    await merge.getByRole('button', { name: 'Save mine over theirs' }).focus();
    await page.keyboard.press('Enter');
    await status(page, `Texts of ${open.identifier} saved, not approved.`);
    expect((await Item.findByPk(open.id))?.altText).toBe('Engraving of the light on the breakwater');

    // a phone-sized window: the desk reflows into one column (WCAG 2.2 SC 1.4.10) and still passes axe-core
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await heading(page, open.identifier).waitFor();
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'review-desk-item-390');
    await page.close();
  });
});
