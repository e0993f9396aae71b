import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import * as exifr from 'exifr';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exportTasks } from '../../jobs/src/tasks/export-build.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { ExportFile, Job } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { SEED_PERIOD, VOCAB, seedLedger, type LedgerSeed } from '../helpers/ledger-seed.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let seed: LedgerSeed;
let manager: SignedIn;
let worker: NightShiftWorker;
const dir = mkdtempSync(join(tmpdir(), 'cartouche-exports-'));

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  worker = new NightShiftWorker({ sequelize, tasks: exportTasks({ config }) });
  seed = await seedLedger(sequelize, config);
  manager = await signIn(app, 'manager');
});
afterAll(async () => {
  await sequelize.close();
});


async function exportOf(kind: string, period: { periodFrom?: string; periodTo?: string } = {}): Promise<{ body: Buffer; type: string; view: Record<string, unknown> }> {
  const asked = await manager.agent.post(`/api/collections/${seed.collection.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind, ...period }).expect(202);
  expect(await worker.runOnce()).toBe(true);
  const view = (await manager.agent.get(`/api/exports/${asked.body.export.id}`).expect(200)).body.export;
  expect(view.status).toBe('ready');
  const file = await manager.agent.get(view.downloadUrl).buffer(true)
    .parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    })
    .expect(200);
  return { body: file.body as Buffer, type: String(file.headers['content-type']), view };
}

describe('the items CSV, read back with csv-parse (npm)', () => {
  it('is UTF-8 with a byte-order mark, CRLF records, one header and one record per item, texts exactly as approved', async () => {
    const { body, type, view } = await exportOf('items_csv', { periodTo: SEED_PERIOD.to });
    expect(type).toMatch(/^text\/csv; charset=utf-8/);
    expect(view.rowCount).toBe(6);
    expect([...body.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    // RFC 4180 §2.1: each record ends with CRLF; every LF in the file is inside a quoted field or ends a record
    expect(body.toString('utf8').endsWith('\r\n')).toBe(true);
    const records = parse(body, { bom: true, columns: true, record_delimiter: '\r\n' }) as Array<Record<string, string>>;
    expect(records.length).toBe(6);
    expect(Object.keys(records[0]!)).toEqual(['Identifier', 'File', 'Form', 'Subjects', 'Concept URIs', 'Alt text', 'Alt text characters', 'Long description', 'Decorative', 'State', 'Reviewer', 'Approved', 'Added', 'Caption']);
    const first = records.find((r) => r.Identifier === 'KHM-P-0001')!;
    expect(first['Alt text']).toBe(seed.text.alt);
    expect(first['Long description']).toBe(seed.text.long.replace('\r\n', '\n'));
    expect(first.Subjects).toBe('lighthouse; pier & jetty');
    expect(first.Approved).toBe('2026-11-24 10:15');
    expect(records.find((r) => r.Identifier === 'KHM-P-0003')!['Alt text']).toBe('');
    expect(records.find((r) => r.Identifier === 'KHM-P-0002')!.Decorative).toBe('yes');
  });
});

describe('the XMP sidecar zip, listed with Info-ZIP unzip and each sidecar read with exifr (npm)', () => {
  it('holds one .xmp per approved item, named like its image; a second file of the same name goes into a folder named by its identifier', async () => {
    const { body, type, view } = await exportOf('xmp_zip');
    expect(type).toBe('application/zip');
    expect(view.rowCount).toBe(3 + 0 + 1); // approved: 0001, 0002 (decorative), 0005, 0006
    const zip = join(dir, 'sidecars.zip');
    writeFileSync(zip, body);
    // unzip -Z1 lists entry names one per line (Info-ZIP zipinfo mode)
    const names = execFileSync('unzip', ['-Z1', zip], { encoding: 'utf8' }).trim().split('\n').sort();
    expect(names).toEqual(['KHM-P-0006/plate-0001.xmp', 'plate-0001.xmp', 'plate-0002.xmp', 'plate-0005.png'.replace('.png', '.xmp')].sort());
    execFileSync('unzip', ['-q', '-o', zip, '-d', join(dir, 'x')]);

    const unentity = (s: string) => s.replaceAll('&lt;', '<').replaceAll('&gt;', '>').replaceAll('&quot;', '"').replaceAll('&apos;', "'").replaceAll('&amp;', '&');
    const read = async (name: string) => (await exifr.sidecar(readFileSync(join(dir, 'x', name)), { mergeOutput: false }, 'xmp')) as Record<string, Record<string, unknown>>;
    const first = await read('plate-0001.xmp');
    const alt = first.Iptc4xmpCore!.AltTextAccessibility as Array<{ lang: string; value: string }>;
    // IPTC Photo Metadata: Lang Alt, x-default first, then the collection's alt-text language (en-GB)
    expect(alt.map((a) => [a.lang, unentity(a.value)])).toEqual([
      ['x-default', seed.text.alt],
      ['en-GB', seed.text.alt],
    ]);
    const ext = first.Iptc4xmpCore!.ExtDescrAccessibility as Array<{ lang: string; value: string }>;
    expect(unentity(ext[0]!.value)).toBe(seed.text.long.replace('\r\n', '\n'));
    expect((first.dc!.subject as string[]).map(unentity)).toEqual(['engraving', 'lighthouse', 'pier & jetty']);
    const terms = first.Iptc4xmpExt!.AboutCvTerm as Array<{ CvId: string; CvTermId: string }>;
    expect(terms.map((t) => t.CvTermId)).toEqual([`${VOCAB}engraving`, `${VOCAB}lighthouse`, `${VOCAB}pier-and-jetty`]);
    expect(new Set(terms.map((t) => t.CvId))).toEqual(new Set([VOCAB]));

    const second = await read('KHM-P-0006/plate-0001.xmp');
    // exifr unwraps a one-entry Bag to its value (noted in its docs and STANDARDS.md)
    expect(second.dc!.subject).toBe('lighthouse');
    expect(second.dc!.identifier).toBe('KHM-P-0006');
    // a decorative item's empty alt: exifr keeps the languages and drops the empty values
    const decorative = await read('plate-0002.xmp');
    expect(decorative.Iptc4xmpCore!.AltTextAccessibility).toEqual([{ lang: 'x-default' }, { lang: 'en-GB' }]);
    expect(decorative.Iptc4xmpCore!.ExtDescrAccessibility).toBeUndefined();
    expect(readFileSync(join(dir, 'x', 'plate-0002.xmp'), 'utf8')).toContain('<rdf:li xml:lang="x-default"></rdf:li>');
  });
});

describe('export jobs', () => {
  it('a job that fails records why on the export and waits for its next attempt; a retry that succeeds makes it ready (nothing half-written is stored)', async () => {
    const asked = await manager.agent.post(`/api/collections/${seed.collection.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind: 'items_csv' }).expect(202);
    const exp = await ExportFile.findByPk(asked.body.export.id);
    // the collection's time zone is broken under the job's feet: Intl refuses it
    await sequelize.query("UPDATE collections SET schedule_timezone = 'Not/AZone' WHERE id = :id", { replacements: { id: seed.collection.id } });
    await worker.runOnce();
    await exp!.reload();
    expect(exp!.status).toBe('queued'); // attempt 1 of 3: it will be tried again
    expect(exp!.error).toMatch(/time ?zone/i);
    expect((await Job.findByPk(exp!.jobId!))!.status).toBe('pending');
    expect(exp!.fileKey).toBeNull();
    await sequelize.query("UPDATE collections SET schedule_timezone = 'Europe/London' WHERE id = :id", { replacements: { id: seed.collection.id } });
    await Job.update({ runAfter: new Date(Date.now() - 1000) }, { where: { id: exp!.jobId! } });
    await worker.runOnce();
    await exp!.reload();
    expect(exp!.status).toBe('ready');
    expect(exp!.error).toBeNull();
    expect(exp!.rowCount).toBe(6);
  });

  it('after its last attempt an export is failed, with the reason, and its file cannot be asked for', async () => {
    const asked = await manager.agent.post(`/api/collections/${seed.collection.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind: 'ledger_xlsx' }).expect(202);
    const exp = (await ExportFile.findByPk(asked.body.export.id))!;
    await Job.update({ attempts: 2 }, { where: { id: exp.jobId! } }); // two attempts already spent of 3
    await sequelize.query("UPDATE collections SET schedule_timezone = 'Not/AZone' WHERE id = :id", { replacements: { id: seed.collection.id } });
    try {
      await worker.runOnce();
    } finally {
      await sequelize.query("UPDATE collections SET schedule_timezone = 'Europe/London' WHERE id = :id", { replacements: { id: seed.collection.id } });
    }
    const view = (await manager.agent.get(`/api/exports/${exp.id}`).expect(200)).body.export;
    expect(view).toMatchObject({ status: 'failed', downloadUrl: null });
    expect(view.error).toMatch(/time ?zone/i);
    const file = await manager.agent.get(`/api/exports/${exp.id}/file`).expect(409);
    expect(file.body.detail).toMatch(/failed/);
  });
});
