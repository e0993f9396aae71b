import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { EmbeddingPool } from '../../jobs/src/embed-pool.ts';
import { createTasks } from '../../jobs/src/tasks/index.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Embedding, Example, Item, ItemTextRead, Run, Suggestion, type Collection } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { emptyCounts, runView, startRun, type RunReport } from '../../server/src/services/runs.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { synthesizeSubjectModel } from '../../server/src/services/subject-models.ts';
import { buildDemoScenario, renderItemImage } from '../../scripts/demo/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeSubject } from '../helpers/fixtures.ts';
import { startTestSmtp } from '../helpers/mail.ts';
import { makePerson, signIn } from '../helpers/people.ts';

// Scans are drawn by the demo renderer: these tests check the pipeline's behaviour, not its accuracy.
let sequelize: Sequelize;
let config: AppConfig;
let pool: EmbeddingPool;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;
const plates = buildDemoScenario().collections[0]!;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  smtp = await startTestSmtp();
  config = { ...config, smtp: { ...config.smtp, port: smtp.port }, mailDir: smtp.mailDir };
  pool = await EmbeddingPool.start(1);
}, 120_000);
afterAll(async () => {
  pool?.dispose();
  await smtp?.close();
  await sequelize?.close();
});
beforeEach(async () => resetDatabase(sequelize));

async function dropFolderWith(n: number): Promise<string> {
  const dir = mkdtempSync(join(tmpdir(), 'cartouche-drop-'));
  for (const item of plates.items.slice(0, n)) writeFileSync(join(dir, item.fileName), (await renderItemImage(item, plates.medium, { width: 400 })).data);
  writeFileSync(join(dir, 'notes.jpg'), 'these are my notes, not a scan');
  return dir;
}

async function lighthouseModel(collection: Collection): Promise<number> {
  const subject = await makeSubject(collection, { prefLabel: 'lighthouse' });
  const storage = new Storage(config.storageDir);
  const embedder = await processEmbedder();
  for (const d of plates.items.filter((i) => i.truth.includes('lighthouse')).slice(20, 22)) {
    const key = await storage.put((await renderItemImage(d, plates.medium, { width: 400 })).data);
    const ex = await Example.create({ subjectId: subject.id, medium: 'illustration', origin: 'uploaded', fileKey: key, itemId: null, createdBy: null });
    await embedStoredFile(embedder, storage, { type: 'example', id: ex.id }, key);
  }
  await synthesizeSubjectModel(sequelize, embedder, subject.id, { mode: 'from-examples' }, null);
  return subject.id;
}

describe('a night-shift run', () => {
  it('ingests the drop folder, embeds, suggests, mails the digest, and a second run changes nothing', async () => {
    const drop = await dropFolderWith(6);
    const c = await makeCollection();
    // this test is about intake and suggestions: reading text (tested below) is turned off by the setting
    await c.update({ dropFolder: drop, readText: false });
    const subjectId = await lighthouseModel(c);
    const editor = await makePerson('editor');
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });

    const run = await startRun(sequelize, c.id, 'manual', null);
    await expect(startRun(sequelize, c.id, 'manual', null)).rejects.toMatchObject({ status: 409, title: 'A run is already under way' });
    expect(await worker.runOnce()).toBe(true);
    const done = await Run.findByPk(run.id);
    expect(done?.status).toBe('succeeded');
    expect(done?.counts).toMatchObject({ ingested: 6, rejected: 1, duplicates: 0, embedded: 6 });
    const report = done!.report as unknown as RunReport;
    expect(report.rejected).toEqual([{ fileName: 'notes.jpg', reason: expect.stringMatching(/not .*(image|JPEG|PNG)/i) }]);
    // ingest, embed, retrain, suggest, text (off in this collection's settings), digest
    expect(Object.entries(report.stages).map(([name, s]) => [name, s.state])).toEqual([['ingest', 'done'], ['embed', 'done'], ['retrain', 'done'], ['suggest', 'done'], ['text', 'skipped'], ['digest', 'done']]);
    expect(report.stages.text.note).toBe('text reading is off in this collection’s settings');
    // processed files are moved aside, never deleted
    expect(readdirSync(drop).sort()).toEqual(['processed', 'rejected']);
    expect(readdirSync(join(drop, 'processed'))).toHaveLength(6);
    expect(readdirSync(join(drop, 'rejected')).sort()).toEqual(['notes.jpg', 'notes.jpg.reason.txt']);
    expect(await Embedding.count({ where: { ownerType: 'item' } })).toBe(6);
    const proposed = await Suggestion.findAll({ where: { subjectId, state: 'proposed' } });
    expect(proposed.length).toBe((done!.counts as { suggested: number }).suggested);
    for (const s of proposed) expect(s.runId).toBe(run.id);
    if (proposed.length) expect(await Item.count({ where: { state: 'suggested' } })).toBe(proposed.length);

    const [mail] = await smtp.messagesTo(editor.email);
    expect(mail?.subject).toMatch(new RegExp(`^${c.name}: ${proposed.length} item\\(s\\) waiting for review$`));
    expect(mail!.text).toContain('New scans: 6 (duplicates skipped: 0, refused: 1)');
    expect(mail!.text).toContain('Scans embedded: 6');

    // a second run: nothing new to ingest or embed, the same proposals, no duplicates
    const again = await startRun(sequelize, c.id, 'manual', null);
    await worker.runOnce();
    const second = await Run.findByPk(again.id);
    expect(second?.status).toBe('succeeded');
    expect(second?.counts).toMatchObject({ ingested: 0, embedded: 0 });
    const after = await Suggestion.findAll({ where: { subjectId, state: 'proposed' }, order: [['itemId', 'ASC']] });
    expect(after.map((s) => s.itemId)).toEqual(proposed.map((s) => s.itemId).sort((a, b) => a - b));
    expect(await Item.count()).toBe(6);
  });

  it('can be started, listed and cancelled through the API by an archivist, not by an editor', async () => {
    const app = createApp({ config, sequelize });
    const archivist = await signIn(app, 'archivist');
    const editor = await signIn(app, 'editor');
    const c = await makeCollection();
    const started = await archivist.agent.post(`/api/collections/${c.id}/runs`).set('x-csrf-token', archivist.csrf).expect(202);
    expect(started.body.run).toMatchObject({ status: 'queued', trigger: 'manual', requestedBy: archivist.user.id });
    await archivist.agent.post(`/api/collections/${c.id}/runs`).set('x-csrf-token', archivist.csrf).expect(409);
    await editor.agent.post(`/api/runs/${started.body.run.id}/cancel`).set('x-csrf-token', editor.csrf).expect(403);
    const list = await editor.agent.get(`/api/collections/${c.id}/runs`).expect(200);
    expect(list.body.runs.map((r: { id: number }) => r.id)).toEqual([started.body.run.id]);
    const cancelled = await archivist.agent.post(`/api/runs/${started.body.run.id}/cancel`).set('x-csrf-token', archivist.csrf).expect(200);
    expect(cancelled.body.run.status).toBe('cancelled');
    // a cancelled run never starts
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });
    await worker.runOnce();
    expect((await Run.findByPk(started.body.run.id))?.status).toBe('cancelled');
  });
});

/** Lines of text (DejaVu Sans, Debian's fonts-dejavu) on paper, as a scan of a printed notice. */
async function lettered(lines: string[]): Promise<Buffer> {
  const text = lines.map((l, i) => `<text x="60" y="${130 + i * 90}" font-family="DejaVu Sans" font-size="56" fill="#1d1b18">${l}</text>`).join('');
  return sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="1400" height="${200 + lines.length * 90}"><rect width="100%" height="100%" fill="#f4efe2"/>${text}</svg>`)).png().toBuffer();
}

async function upload(c: Collection, fileName: string, data: Buffer): Promise<number> {
  const outcome = await ingestFile({ sequelize, storage: new Storage(config.storageDir), limits: intakeLimits({}) }, { collectionId: c.id, fileName, source: { buffer: data }, origin: 'upload' });
  if (outcome.outcome !== 'ingested') throw new Error(JSON.stringify(outcome));
  return outcome.itemId;
}

async function runToEnd(worker: NightShiftWorker, c: Collection) {
  const run = await startRun(sequelize, c.id, 'manual', null);
  expect(await worker.runOnce()).toBe(true);
  const done = (await Run.findByPk(run.id))!;
  expect(done.status).toBe('succeeded');
  return { counts: done.counts as Record<string, number>, report: done.report as unknown as RunReport };
}

describe('the text stage of a night-shift run', () => {
  it('reads the text in a collection’s scans by default, after the suggestions are made, and reads nothing twice', async () => {
    const c = await makeCollection();
    expect(c.readText).toBe(true);
    const notice = await upload(c, 'pier-tolls.png', await lettered(['PIER TOLLS', 'ONE PENNY A HEAD']));
    const plain = await upload(c, 'grey.png', await sharp({ create: { width: 900, height: 600, channels: 3, background: '#8a8a80' } }).png().toBuffer());
    await lighthouseModel(c);
    const editor = await makePerson('editor');
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });

    const first = await runToEnd(worker, c);
    expect(first.counts.textRead).toBe(2);
    expect(first.report.stages.text).toMatchObject({ state: 'done', done: 2, total: 2, note: '2 read, 0 mostly text' });
    // suggestions first, the slow part after them
    expect(first.report.stages.suggest.state).toBe('done');
    expect(Date.parse(first.report.stages.text.startedAt!)).toBeGreaterThanOrEqual(Date.parse(first.report.stages.suggest.finishedAt!));
    expect(Date.parse(first.report.stages.digest.startedAt!)).toBeGreaterThanOrEqual(Date.parse(first.report.stages.text.finishedAt!));
    expect((await Item.findByPk(notice))!.ocrText).toBe('PIER TOLLS\nONE PENNY A HEAD');
    expect((await Item.findByPk(plain))!.ocrText).toBeNull();
    expect(await ItemTextRead.count()).toBe(2);
    const [mail] = await smtp.messagesTo(editor.email);
    expect(mail!.text).toContain('Scans searched for text: 2');
    expect(mail!.text).toContain('text found in scans are not descriptions until a person approves them');

    const second = await runToEnd(worker, c);
    expect(second.counts.textRead).toBe(0);
    expect(second.report.stages.text).toMatchObject({ state: 'skipped', note: 'every scan’s text was already read' });
  });

  it('does not read when the collection’s setting is off or the site turns reading off, and reads once allowed again', async () => {
    const c = await makeCollection();
    await c.update({ readText: false });
    const notice = await upload(c, 'ferry-times.png', await lettered(['FERRY TIMES']));
    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });

    const off = await runToEnd(worker, c);
    expect(off.report.stages.text).toMatchObject({ state: 'skipped', note: 'text reading is off in this collection’s settings' });
    expect(await ItemTextRead.count()).toBe(0);

    await c.update({ readText: true });
    process.env.CARTOUCHE_NIGHTSHIFT_OCR = 'off';
    try {
      const site = await runToEnd(worker, c);
      expect(site.report.stages.text).toMatchObject({ state: 'skipped', note: 'text reading is turned off for the whole site (CARTOUCHE_NIGHTSHIFT_OCR=off)' });
      expect(await ItemTextRead.count()).toBe(0);
      // a misspelt switch is refused when the worker's tasks are made, naming the variable
      process.env.CARTOUCHE_NIGHTSHIFT_OCR = 'of';
      expect(() => createTasks({ config, pool: async () => pool })).toThrow(/CARTOUCHE_NIGHTSHIFT_OCR must be "off"/);
    } finally {
      delete process.env.CARTOUCHE_NIGHTSHIFT_OCR;
    }
    const on = await runToEnd(worker, c);
    expect(on.counts.textRead).toBe(1);
    expect((await Item.findByPk(notice))!.ocrText).toBe('FERRY TIMES');
  });

  it('a run recorded with the old stage order is shown in today’s order and, taken over, goes on with what is left', async () => {
    const c = await makeCollection();
    const notice = await upload(c, 'harbour-dues.png', await lettered(['HARBOUR DUES']));
    const at = '2026-11-30T02:00:00.000Z';
    const finished = { state: 'done', done: 0, total: null, startedAt: at, finishedAt: at };
    // an older worker: text between embed and retrain; this run got to suggest, then its worker died
    const old = { stages: { ingest: finished, embed: finished, text: { state: 'pending', done: 0, total: null, startedAt: null, finishedAt: null }, retrain: finished, suggest: finished }, rejected: [], errors: [] };
    const run = await startRun(sequelize, c.id, 'manual', null);
    await run.update({ report: old as unknown as Record<string, unknown>, counts: emptyCounts() });
    // shown in today's order; a stage the old report lacks (digest) is not started
    expect(runView((await Run.findByPk(run.id))!).stages.map((s) => [s.name, s.state])).toEqual([['ingest', 'done'], ['embed', 'done'], ['retrain', 'done'], ['suggest', 'done'], ['text', 'pending'], ['digest', 'pending']]);

    const worker = new NightShiftWorker({ sequelize, tasks: createTasks({ config, pool: async () => pool }) });
    expect(await worker.runOnce()).toBe(true);
    const done = (await Run.findByPk(run.id))!;
    expect(done.status).toBe('succeeded');
    const report = done.report as unknown as RunReport;
    // what was done is not done again; text and digest are
    expect(report.stages.retrain.finishedAt).toBe(at);
    expect(report.stages.text.state).toBe('done');
    expect(report.stages.digest.state).toBe('done');
    expect((await Item.findByPk(notice))!.ocrText).toBe('HARBOUR DUES');
  });
});

describe('night-shift settings of a collection', () => {
  it('accepts a valid schedule and refuses a bad cron expression, time zone or relative drop folder, naming each', async () => {
    const app = createApp({ config, sequelize });
    const archivist = await signIn(app, 'archivist');
    const c = await makeCollection();
    const ok = await archivist.agent
      .put(`/api/collections/${c.id}/schedule`)
      .set('x-csrf-token', archivist.csrf)
      .send({ scheduleCron: '0 3 * * *', scheduleTimezone: 'Europe/Lisbon', scheduleEnabled: true, dropFolder: '/srv/scans/plates' })
      .expect(200);
    expect(ok.body.schedule).toEqual({ scheduleCron: '0 3 * * *', scheduleTimezone: 'Europe/Lisbon', scheduleEnabled: true, dropFolder: '/srv/scans/plates' });
    const bad = await archivist.agent
      .put(`/api/collections/${c.id}/schedule`)
      .set('x-csrf-token', archivist.csrf)
      .send({ scheduleCron: 'every night', scheduleTimezone: 'Harbour/Kestrelmouth', scheduleEnabled: true, dropFolder: 'scans' })
      .expect(400);
    expect(bad.body.errors.map((e: { path: string }) => e.path).sort()).toEqual(['dropFolder', 'scheduleCron', 'scheduleTimezone']);
    expect((await archivist.agent.get(`/api/collections/${c.id}/schedule`).expect(200)).body.schedule.scheduleCron).toBe('0 3 * * *');
  });
});
