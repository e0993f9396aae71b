import { mkdtempSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import { Collection, Example, Item, Subject } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

// The scans and the uploaded example are drawn by the demo renderer (the invented Kestrelmouth Harbour
// Museum); this checks the studio's screens and their accessibility, not accuracy.
let sequelize: Sequelize;
let server: Server;
let browser: Browser;
let base: string;
let archivistEmail: string;
let platesId: number;
let lighthouseImage: Buffer;
const plates = buildDemoScenario().collections[0]!;

beforeAll(async () => {
  assertClientBuilt();
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-e2e-studio-'));
  const opened = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') });
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  const c = await makeCollection({ slug: 'harbour-plates', name: 'Kestrelmouth harbour plates', medium: plates.medium });
  platesId = c.id;
  await makeCollection({ slug: 'quay-photographs', name: 'Quay photographs', medium: 'photograph' });
  archivistEmail = (await makePerson('archivist', { displayName: 'Morwen Tidewell' })).email;
  const vessel = await makeSubject(c, { prefLabel: 'vessel' });
  await makeSubject(c, { prefLabel: 'brig' });
  await makeSubject(c, { prefLabel: 'engraving', kind: 'form' });
  void vessel;

  // twelve scans of the collection, read (embedded) as the night shift would
  const storage = new Storage(opened.config.storageDir);
  const embedder = await processEmbedder();
  const scans = [...plates.items.filter((i) => i.truth.includes('lighthouse')).slice(0, 4), ...plates.items.filter((i) => !i.truth.includes('lighthouse')).slice(0, 8)];
  for (const d of scans) {
    const bytes = (await renderItemImage(d, plates.medium, { width: 320 })).data;
    const fileKey = await storage.put(bytes);
    const item = await Item.create({ collectionId: c.id, identifier: d.identifier, fileName: d.fileName, fileKey, mimeType: 'image/jpeg', width: null, height: null, byteSize: bytes.length, caption: d.caption, creator: null, dateText: null, rights: null, captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null });
    await embedStoredFile(embedder, storage, { type: 'item', id: item.id }, fileKey);
  }
  const exampleSource = plates.items.filter((i) => i.truth.includes('lighthouse'))[10]!;
  lighthouseImage = (await renderItemImage(exampleSource, plates.medium, { width: 320 })).data;

  const app = createApp({ config: { ...opened.config, clientDir: clientBuildDir }, sequelize });
  server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  browser = await launchBrowser();
}, 240_000);

afterAll(async () => {
  await browser?.close();
  await new Promise((r) => server?.close(r));
  await sequelize?.close();
});

/** Draws a shape on the sketch pad with the mouse: a tower (a tall rectangle) or waves. */
async function draw(page: Page, shape: 'tower' | 'waves') {
  const pad = page.getByTestId('sketch-pad');
  await pad.scrollIntoViewIfNeeded();
  const box = (await pad.boundingBox())!;
  const at = (fx: number, fy: number) => [box.x + fx * box.width, box.y + fy * box.height] as const;
  const path: Array<readonly [number, number]> =
    shape === 'tower'
      ? [at(0.42, 0.85), at(0.45, 0.2), at(0.55, 0.2), at(0.58, 0.85), at(0.42, 0.85)]
      : Array.from({ length: 12 }, (_, i) => at(0.1 + i * 0.07, 0.7 + (i % 2 ? -0.06 : 0.06)));
  await page.mouse.move(...path[0]!);
  await page.mouse.down();
  for (const p of path.slice(1)) await page.mouse.move(p[0], p[1], { steps: 6 });
  await page.mouse.up();
}

describe('the subject studio in a real browser', () => {
  it('an archivist creates a subject by drawing two sketches and uploading one image; the preview ranks the scans', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1280, height: 900 } });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(base) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) external.push(r.url());
    });
    await signInThroughPage(page, base, archivistEmail, TEST_PASSWORD);
    await page.getByRole('navigation').getByRole('link', { name: 'Subjects' }).click();
    await page.getByRole('heading', { name: 'Subjects', level: 1 }).waitFor();
    await page.getByLabel('Collection').selectOption({ label: 'Kestrelmouth harbour plates (12 items)' });
    await page.getByRole('link', { name: 'vessel' }).waitFor();
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'studio-vocabulary');

    // a subject is named and opens on its own page
    await page.getByRole('button', { name: 'New subject' }).click();
    await page.getByLabel('Preferred label').fill('lighthouse');
    await page.getByRole('button', { name: 'Create the subject' }).click();
    await page.getByRole('heading', { name: 'lighthouse', level: 1 }).waitFor();
    const subject = (await Subject.findOne({ where: { collectionId: platesId, prefLabel: 'lighthouse' } }))!;
    expect(new URL(page.url()).pathname).toBe(`/subjects/${subject.id}`);
    expect(await page.getByRole('main').innerText()).toContain('The preview appears once “lighthouse” has an example.');

    // two sketches drawn on the pad, with an undo on the way
    await draw(page, 'tower');
    await draw(page, 'waves');
    expect(await page.getByTestId('sketch-pad').getAttribute('aria-label')).toBe('Sketch pad with 2 strokes');
    await page.getByRole('button', { name: 'Undo' }).click();
    expect(await page.getByTestId('sketch-pad').getAttribute('aria-label')).toBe('Sketch pad with 1 stroke');
    await screenshot(page, 'studio-sketch-pad');
    await page.getByRole('button', { name: 'Save the sketch as an example' }).click();
    await page.getByRole('heading', { name: '1 example', exact: true }).waitFor();
    expect(await page.getByTestId('sketch-pad').getAttribute('aria-label')).toBe('Sketch pad, empty');
    await page.getByRole('button', { name: 'Bold' }).click();
    await draw(page, 'tower');
    await page.getByRole('button', { name: 'Save the sketch as an example' }).click();
    await page.getByRole('heading', { name: '2 examples', exact: true }).waitFor();

    // one image uploaded as an illustration
    await page.getByLabel('Illustration', { exact: true }).check();
    await page.getByLabel('Example images for “lighthouse”').setInputFiles({ name: 'lighthouse-plate.jpg', mimeType: 'image/jpeg', buffer: lighthouseImage });
    await page.getByRole('heading', { name: '3 examples', exact: true }).waitFor();
    const stored = await Example.findAll({ where: { subjectId: subject.id }, order: [['id', 'ASC']] });
    expect(stored.map((e) => [e.medium, e.origin])).toEqual([
      ['sketch', 'drawn'],
      ['sketch', 'drawn'],
      ['illustration', 'uploaded'],
    ]);
    // each example says its medium in words
    const main = page.getByRole('main');
    expect(await main.innerText()).toMatch(/Sketch \(2\)[\s\S]*Illustration \(1\)/);
    expect(await main.getByText('Sketch, drawn on the sketch pad').count()).toBe(2);

    // the preview ranks the collection; the threshold at its lowest lists every scan
    const ranked = page.getByRole('list', { name: 'Items “lighthouse” ranks highest' });
    const slider = page.getByRole('slider');
    await slider.focus();
    await page.keyboard.press('Home');
    await page.getByText(/^The \d+ highest of 12 scans at this threshold, ranked by the average of the examples/).waitFor({ timeout: 15_000 });
    const shown = await ranked.getByRole('listitem').count();
    expect(shown).toBeGreaterThanOrEqual(10);
    // ranked best first: the distances above the usual score never rise down the list
    const zs = (await ranked.getByRole('listitem').allInnerTexts()).map((t) => Number(/([−-]?\d+\.\d) SD above/.exec(t)![1]!.replace('−', '-')));
    expect(zs).toEqual([...zs].sort((a, b) => b - a));
    expect(await main.innerText()).toContain('No estimate of precision or recall yet.');
    expect(await main.innerText()).toContain('Too few reviewed items to estimate: 0 of the 10 needed.');
    expect(await main.innerText()).toContain('No probabilities yet');
    const first = await ranked.getByRole('listitem').first().innerText();
    expect(first).toMatch(/SD above the usual score/);

    // a model from the examples, shown with its method, version and what it was made from
    await page.getByRole('button', { name: 'Make the model' }).click();
    await page.getByText(/Model version 1 of “lighthouse” is made and active/).waitFor();
    await page.getByText(/^Version 1, made /).waitFor();
    const modelText = await main.innerText();
    expect(modelText).toMatch(/Version 1, made /);
    expect(modelText).toMatch(/Made from\s+3 examples/);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'studio-subject');
    expect(external).toEqual([]);
    await page.close();
  }, 240_000);

  it('re-parents subjects with and without dragging, refuses a broken SKOS import, and the collection screens pass axe', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1280, height: 900 } });
    await signInThroughPage(page, base, archivistEmail, TEST_PASSWORD);
    await page.goto(`${base}/subjects?collection=${platesId}`);
    await page.getByRole('button', { name: 'Move under… (“brig”)' }).click();
    await page.getByLabel('New broader subject for “brig”').selectOption({ label: 'vessel' });
    await page.getByRole('button', { name: 'Move', exact: true }).click();
    await page.getByRole('status').filter({ hasText: '“brig” is now under “vessel”.' }).waitFor();
    const vessel = (await Subject.findOne({ where: { collectionId: platesId, prefLabel: 'vessel' } }))!;
    expect((await Subject.findOne({ where: { prefLabel: 'brig' } }))!.broaderId).toBe(vessel.id);
    // the tree now shows brig inside vessel's list
    await expect.poll(() => page.getByRole('listitem').filter({ has: page.getByRole('link', { name: 'vessel', exact: true }) }).getByRole('link', { name: 'brig', exact: true }).count()).toBe(1);
    // a loop is refused before anything is sent, and said
    await page.getByRole('button', { name: 'Move under… (“vessel”)' }).click();
    const options = await page.getByLabel('New broader subject for “vessel”').locator('option').allInnerTexts();
    expect(options.map((o) => o.trim())).not.toContain('brig');
    await page.getByRole('button', { name: 'Cancel' }).click();
    await screenshot(page, 'studio-tree-moved');
    expect(await axeViolations(page)).toEqual([]);

    // the same by dragging: "engraving" by its handle onto "lighthouse"
    const handle = page.getByRole('button', { name: 'Drag “engraving” to another broader subject' });
    const target = page.getByRole('link', { name: 'lighthouse', exact: true });
    const from = (await handle.boundingBox())!;
    const to = (await target.boundingBox())!;
    await page.mouse.move(from.x + from.width / 2, from.y + from.height / 2);
    await page.mouse.down();
    await page.mouse.move(from.x + 20, from.y + 10, { steps: 4 });
    await page.mouse.move(to.x + to.width / 2, to.y + to.height / 2, { steps: 12 });
    await page.mouse.up();
    await page.getByRole('status').filter({ hasText: '“engraving” is now under “lighthouse”.' }).waitFor();
    const lighthouse = (await Subject.findOne({ where: { collectionId: platesId, prefLabel: 'lighthouse' } }))!;
    expect((await Subject.findOne({ where: { prefLabel: 'engraving' } }))!.broaderId).toBe(lighthouse.id);

    // an import that breaks SKOS integrity is reported concept by concept, and nothing lands
    const before = await Subject.count({ where: { collectionId: platesId } });
    await page.getByLabel('Vocabulary file').setInputFiles({
      name: 'harbour.ttl',
      mimeType: 'text/turtle',
      buffer: Buffer.from('@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<https://kestrelmouth-harbour.example/v/pier> a skos:Concept ; skos:prefLabel "pier"@en, "jetty"@en .\n'),
    });
    await page.getByRole('button', { name: 'Import' }).click();
    await page.getByText('Vocabulary not imported').waitFor();
    expect(await page.getByRole('main').innerText()).toContain('https://kestrelmouth-harbour.example/v/pier: SKOS Reference S14');
    expect(await Subject.count({ where: { collectionId: platesId } })).toBe(before);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'studio-import-refused');

    await page.goto(`${base}/collections`);
    await page.getByRole('heading', { name: 'Collections', level: 1 }).waitFor();
    await page.getByRole('button', { name: 'New collection' }).click();
    await page.getByLabel('Name', { exact: true }).fill('Kestrelmouth lantern slides');
    expect(await page.getByLabel('Short name').inputValue()).toBe('kestrelmouth-lantern-slides');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'studio-collections');

    await page.goto(`${base}/collections/${platesId}`);
    await page.getByRole('heading', { name: 'Kestrelmouth harbour plates', level: 1 }).waitFor();
    await page.getByLabel('Language of the alt text').fill('english');
    await page.getByRole('button', { name: 'Save the settings' }).click();
    await page.getByText('A language tag such as “en”, “cy” or “fr-CA” (BCP 47).').waitFor();
    // saving the night-shift schedule on the same page does not make the settings form's copy stale
    await page.getByLabel('Schedule', { exact: true }).fill('30 1 * * *');
    await page.getByRole('button', { name: 'Save settings', exact: true }).click();
    await page.getByRole('status').filter({ hasText: 'Settings saved.' }).waitFor();
    await page.getByLabel('Language of the alt text').fill('en-GB');
    await page.getByLabel('House style notes').fill('Name the vessel only when the caption does.');
    await page.getByRole('button', { name: 'Save the settings' }).click();
    await page.getByText(/^Saved at /).waitFor();
    expect((await Collection.findByPk(platesId))!).toMatchObject({ altTextLanguage: 'en-GB', houseStyle: 'Name the vessel only when the caption does.', scheduleCron: '30 1 * * *' });
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'studio-collection-settings');
    await page.close();
  }, 120_000);
});
