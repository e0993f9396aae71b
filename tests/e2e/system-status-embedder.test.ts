/**
 * The overview's system-status line tells which runtime turns images into features: not started yet,
 * ONNX Runtime (checked against TensorFlow.js), or TensorFlow.js as the slower fallback with the reason.
 * Looked at in Chromium (screenshots under .data/screenshots/) and checked with axe-core.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Browser, Page } from 'playwright-core';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import { WorkerHeartbeat } from '../../server/src/models/index.ts';
import { processEmbedder, stopProcessEmbedder } from '../../server/src/services/features.ts';
import { assertClientBuilt, axeViolations, clientBuildDir, launchBrowser, screenshot, signInThroughPage } from '../helpers/browser.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection } from '../helpers/fixtures.ts';
import { TEST_PASSWORD, makePerson } from '../helpers/people.ts';

let sequelize: Sequelize;
let server: Server;
let browser: Browser;
let base: string;
let adminEmail: string;

beforeAll(async () => {
  assertClientBuilt();
  const opened = await openTestDatabase();
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  await makeCollection({ slug: 'plates', name: 'Harbour plates', medium: 'engraving' });
  adminEmail = (await makePerson('admin')).email;
  const now = new Date();
  await WorkerHeartbeat.create({ workerId: 'e2e', hostname: 'e2e', pid: 1, startedAt: now, heartbeatAt: now, stoppedAt: null, currentJobId: null });
  await stopProcessEmbedder();
  const app = createApp({ config: { ...opened.config, clientDir: clientBuildDir, embedder: { ...opened.config.embedder, runtime: 'onnx', configFile: null } }, sequelize });
  server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  browser = await launchBrowser();
});

afterAll(async () => {
  await stopProcessEmbedder();
  delete process.env.CARTOUCHE_DISABLE_ONNXRUNTIME;
  await browser?.close();
  await new Promise((r) => server?.close(r));
  await sequelize?.close();
});

async function statusLine(page: Page): Promise<string> {
  const section = page.getByRole('region', { name: /System status/ });
  await section.getByText(/Image features/).waitFor();
  return (await section.innerText()).replace(/\s+/g, ' ');
}

describe('the embedder on the system-status line', () => {
  it('says the image features have not started, then that they run on ONNX Runtime', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signInThroughPage(page, base, adminEmail, TEST_PASSWORD);
    expect(await statusLine(page)).toContain('Image features not started ONNX Runtime starts when the API starts, or at the first upload of examples');
    await processEmbedder();
    await page.reload();
    const text = await statusLine(page);
    expect(text).toContain('Image features on ONNX Runtime centernet-mnv3-b14-ap-mp-320-onnx@1, checked against TensorFlow.js at start');
    await screenshot(page, 'system-status-embedder-onnx-1280');
    await page.setViewportSize({ width: 390, height: 900 });
    const overflow = await page.getByRole('region', { name: /System status/ }).evaluate((el) => el.scrollWidth - el.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, 'system-status-embedder-onnx-390');
    await page.close();
  });

  it('names TensorFlow.js as the slower fallback, with the reason, when ONNX Runtime cannot load; no axe violations', async () => {
    await stopProcessEmbedder();
    process.env.CARTOUCHE_DISABLE_ONNXRUNTIME = '1'; // the embedder's worker thread inherits it
    try {
      await processEmbedder();
    } finally {
      delete process.env.CARTOUCHE_DISABLE_ONNXRUNTIME;
    }
    for (const width of [1280, 390]) {
      const page = await browser.newPage({ viewport: { width, height: 900 }, bypassCSP: true });
      await signInThroughPage(page, base, adminEmail, TEST_PASSWORD);
      const text = await statusLine(page);
      expect(text).toContain('Image features on TensorFlow.js the slower fallback; ONNX Runtime is not in use: onnxruntime-node is switched off (CARTOUCHE_DISABLE_ONNXRUNTIME=1)');
      // nothing sticks out of the status card, even at phone width
      const overflow = await page.getByRole('region', { name: /System status/ }).evaluate((el) => el.scrollWidth - el.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      expect(await axeViolations(page)).toEqual([]);
      await screenshot(page, `system-status-embedder-fallback-${width}`);
      await page.close();
    }
  });
});
