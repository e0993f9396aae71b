import { mkdtempSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import { Item } from '../../server/src/models/index.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection } from '../helpers/fixtures.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

let sequelize: Sequelize;
let server: Server;
let browser: Browser;
let base: string;
let archivistEmail: string;
let platesId: number;

beforeAll(async () => {
  assertClientBuilt();
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-e2e-intake-'));
  const opened = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') });
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  await makeCollection({ slug: 'quay-photographs', name: 'Quay photographs', medium: 'photograph' });
  platesId = (await makeCollection({ slug: 'harbour-plates', name: 'Kestrelmouth harbour plates', medium: 'engraving' })).id;
  archivistEmail = (await makePerson('archivist', { displayName: 'Morwen Tidewell' })).email;
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

/** A harbour-ish scan: a sky-to-water gradient with a pier drawn across it. */
async function harbourScan(width: number, height: number): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
    <defs><linearGradient id="g" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="#d9e4e6"/><stop offset="1" stop-color="#1f6472"/></linearGradient></defs>
    <rect width="100%" height="100%" fill="url(#g)"/>
    <rect x="${width * 0.1}" y="${height * 0.55}" width="${width * 0.8}" height="${height * 0.06}" fill="#3b2f25"/>
    <rect x="${width * 0.7}" y="${height * 0.25}" width="${width * 0.05}" height="${height * 0.3}" fill="#fffdf8"/></svg>`;
  return sharp(Buffer.from(svg)).jpeg({ quality: 88 }).toBuffer();
}

const outcomeOf = (page: Page, fileName: string) => page.getByRole('listitem', { name: fileName, exact: true });

describe('the Intake screen in a real browser', () => {
  it('an archivist uploads two scans, sees each outcome in words, imports catalogue records, and axe finds no WCAG 2.2 A/AA violations', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 1280, height: 900 } });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(base) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) external.push(r.url());
    });
    await signInThroughPage(page, base, archivistEmail, TEST_PASSWORD);
    await page.getByRole('navigation').getByRole('link', { name: 'Intake' }).click();
    await page.getByRole('heading', { name: 'Intake', level: 1 }).waitFor();
    await page.getByLabel('Collection').selectOption({ label: 'Kestrelmouth harbour plates (0 items)' });
    expect(new URL(page.url()).searchParams.get('collection')).toBe(String(platesId));
    expect(await axeViolations(page)).toEqual([]);

    await page.locator('input[type="file"][aria-label="Scans to add"]').setInputFiles([
      { name: 'east-pier.jpg', mimeType: 'image/jpeg', buffer: await harbourScan(1800, 1200) },
      { name: 'ledger-page.jpg', mimeType: 'image/jpeg', buffer: Buffer.from('Kestrelmouth Harbour Museum, accession ledger, 1903.\n') },
    ]);
    await expect.poll(() => page.getByRole('status').filter({ hasText: 'All 2 files are done' }).count(), { timeout: 20_000 }).toBe(1);
    const announced = await page.getByRole('status').filter({ hasText: 'All 2 files are done' }).innerText();
    expect(announced).toBe('All 2 files are done: 1 added, 1 not added.');
    const pier = (await outcomeOf(page, 'east-pier.jpg').innerText()).replace(/\s+/g, ' ');
    expect(pier).toContain('Added');
    expect(pier).toContain('Added as EAST-PIER: JPEG, 1,800 × 1,200 pixels.');
    const ledger = (await outcomeOf(page, 'ledger-page.jpg').innerText()).replace(/\s+/g, ' ');
    expect(ledger).toContain('Not added');
    expect(ledger).toContain('This is a text file, even though its name ends in .jpg, not a JPEG, PNG, TIFF or WebP image.');
    // the thumbnail of the new item loads from the API
    const thumb = outcomeOf(page, 'east-pier.jpg').locator('img');
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(320);
    expect(await thumb.getAttribute('alt')).toBe('');
    const items = await Item.findAll({ where: { collectionId: platesId } });
    expect(items.map((i) => i.identifier)).toEqual(['EAST-PIER']);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'intake-uploaded-1280');

    // the keyboard way: Tab to the file button, Enter opens the chooser; the same bytes again are recognised
    await page.getByRole('button', { name: 'Clear the list' }).click();
    await page.getByLabel('Collection').focus();
    let onButton = false;
    for (let i = 0; i < 10 && !onButton; i++) {
      await page.keyboard.press('Tab');
      onButton = await page.evaluate(() => document.activeElement?.textContent === 'Choose scans…');
    }
    expect(onButton).toBe(true);
    // a headless page that lost focus to another test's page ignores key presses: bring it to the front first
    await page.bringToFront();
    // the key only opens the chooser from an enabled, focused button: check both first, so a failure says which
    const choose = page.getByRole('button', { name: 'Choose scans…' });
    await expect.poll(() => choose.evaluate((b: HTMLButtonElement) => !b.disabled && document.activeElement === b && document.hasFocus())).toBe(true);
    // start waiting for the chooser before the key goes down (the listener turns on the page's file-chooser
    // interception), then press Enter on the focused button itself, so a re-render cannot swallow the key
    const chooserShown = page.waitForEvent('filechooser', { timeout: 15_000 });
    await choose.press('Enter');
    const chooser = await chooserShown;
    expect(chooser.isMultiple()).toBe(true);
    await chooser.setFiles([{ name: 'east-pier-again.jpg', mimeType: 'image/jpeg', buffer: await harbourScan(1800, 1200) }]);
    await outcomeOf(page, 'east-pier-again.jpg').getByText('Already there').waitFor();
    expect(await outcomeOf(page, 'east-pier-again.jpg').innerText()).toContain('already in this collection as EAST-PIER');

    // catalogue records for the new item, previewed and applied
    const csv = 'File name,Title,Artist,Date,Licence,Shelf\neast-pier.jpg,The east pier at low water,Ada Quill,1903,Public domain,B12\nwest-pier.jpg,Not uploaded yet,,,,\n';
    await page.locator('input[type="file"][aria-label="Catalogue sheet"]').setInputFiles({ name: 'plates.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await page.getByRole('heading', { name: 'Preview: plates.csv' }).waitFor();
    const rows = page.getByRole('region', { name: 'Preview: plates.csv' });
    const row2 = (await rows.getByRole('listitem', { name: /^Row 2/ }).innerText()).replace(/\s+/g, ' ');
    expect(row2).toContain('Will change');
    // the arrow is for the eye; assistive technology reads "from … to …"
    expect(row2).toMatch(/Caption from empty\s*→\s*to “The east pier at low water”/);
    expect(row2).toContain('matched by file name');
    const row3 = (await rows.getByRole('listitem', { name: /^Row 3/ }).innerText()).replace(/\s+/g, ' ');
    expect(row3).toContain('No item of this collection was made from a file named west-pier.jpg.');
    expect(await rows.innerText()).toContain('“Shelf”');
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'intake-preview-1280');
    // nothing changed before applying
    expect((await Item.findOne({ where: { identifier: 'EAST-PIER' } }))?.caption).toBeNull();

    await page.getByRole('button', { name: 'Apply 1 change' }).click();
    await page.getByText('1 item was updated.').waitFor();
    const pierItem = await Item.findOne({ where: { identifier: 'EAST-PIER' } });
    expect(pierItem).toMatchObject({ caption: 'The east pier at low water', creator: 'Ada Quill', dateText: '1903', rights: 'Public domain' });
    expect(await axeViolations(page)).toEqual([]);

    await page.setViewportSize({ width: 390, height: 844 });
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'intake-applied-390');
    expect(external).toEqual([]);
    await page.close();
  });

  it('shows the per-file progress while a scan is sent, at a phone width', async () => {
    const page = await browser.newPage({ bypassCSP: true, viewport: { width: 390, height: 844 } });
    await signInThroughPage(page, base, archivistEmail, TEST_PASSWORD);
    await page.goto(`${base}/intake?collection=${platesId}`);
    await page.getByRole('heading', { name: 'Intake', level: 1 }).waitFor();
    // slow the upload answer down so the in-between state can be seen and checked
    await page.route('**/items/upload', async (route) => {
      await new Promise((r) => setTimeout(r, 1500));
      await route.continue();
    });
    await page.locator('input[type="file"][aria-label="Scans to add"]').setInputFiles([{ name: 'lantern.jpg', mimeType: 'image/jpeg', buffer: await harbourScan(900, 1400) }]);
    const bar = page.getByRole('progressbar', { name: 'Sending lantern.jpg' });
    await bar.waitFor();
    expect(await page.getByRole('progressbar', { name: 'All files' }).count()).toBe(1);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, 'intake-sending-390');
    await outcomeOf(page, 'lantern.jpg').getByText('Added as LANTERN').waitFor({ timeout: 20_000 });
    expect(await bar.count()).toBe(0);
    await page.close();
  });

  it('is not offered to an editor, and says why at its address', async () => {
    const editor = await makePerson('editor');
    const page = await browser.newPage({ bypassCSP: true });
    await signInThroughPage(page, base, editor.email, TEST_PASSWORD);
    expect(await page.getByRole('navigation').getByText('Intake').count()).toBe(0);
    await page.goto(`${base}/intake`);
    await page.getByRole('heading', { name: /have access to this screen/ }).waitFor();
    expect(await page.getByText('Intake is for people who can import scans.').count()).toBe(1);
    await page.close();
  });
});
