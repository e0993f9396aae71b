/**
 * Coverage-ledger benchmark: `npm run bench:ledger -- [--items 100000] [--db cartouche_bench_ledger] [--kinds ledger,csv,xmp]`
 *
 * Generates a collection of N items (invented Kestrelmouth Harbour Museum plates: 60 % approved with alt
 * text, some with a long description, two decided subjects each) in a scratch database once, then builds
 * the coverage ledger with the product's streaming writer and prints, at 10 000, 50 000 and 100 000 rows,
 * the rows per second so far and in the last stretch, this process's CPU time per 1 000 rows (the database
 * server's is not in it; on a shared machine this column moves less with load than rows/s), the resident set
 * size then and its peak so far, and the heap still referenced after a full collection. Flat memory means
 * the live heap and the peak stop growing while the rows do. The scratch database is created by root
 * beforehand (see DEVELOPERS.md) and never the product's own.
 */
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { rm, stat } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import v8 from 'node:v8';
import vm from 'node:vm';
import { QueryTypes } from 'sequelize';
import { loadConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { createMigrator } from '../../server/src/db/migrator.ts';
import { Collection } from '../../server/src/models/index.ts';
import { writeItemsCsv } from '../../server/src/services/exports/csv.ts';
import { writeLedger } from '../../server/src/services/exports/ledger.ts';
import { writeXmpZip } from '../../server/src/services/exports/xmp.ts';

const { values } = parseArgs({ options: { items: { type: 'string', default: '100000' }, db: { type: 'string', default: 'cartouche_bench_ledger' }, kinds: { type: 'string', default: 'ledger' } } });
// a full collection at each checkpoint, so "live heap" is what is still referenced, not garbage waiting for the collector
v8.setFlagsFromString('--expose-gc');
const gc = vm.runInNewContext('gc') as () => void;
const N = Number(values.items);
if (!Number.isInteger(N) || N < 1000) throw new Error('--items must be a whole number of at least 1000');
if (values.db === 'cartouche') throw new Error('refusing to use the product database for a benchmark');

const config = loadConfig();
const sequelize = openDatabase({ ...config.db, name: values.db }, { pool: 4 });
await createMigrator(sequelize).up();

const SLUG = `bench-ledger-${N}`;
async function ensureData(): Promise<Collection> {
  const existing = await Collection.findOne({ where: { slug: SLUG } });
  if (existing) {
    const [row] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM items WHERE collection_id = :id', { type: QueryTypes.SELECT, replacements: { id: existing.id } });
    if (Number(row?.n) === N) return existing;
    await existing.destroy(); // an interrupted generation: start again
  }
  const started = performance.now();
  const c = await Collection.create({ slug: SLUG, name: `Bench plates (${N})`, description: 'Generated for the ledger benchmark.', medium: 'engraving', houseStyle: '', scheduleTimezone: 'Europe/London', dropFolder: null, archivedAt: null });
  const [editorId] = (await sequelize.query(
    "INSERT INTO users (email, display_name, role, active) VALUES (:email, 'Bench editor', 'editor', 1) ON DUPLICATE KEY UPDATE id = LAST_INSERT_ID(id)",
    { replacements: { email: 'bench-editor@kestrelmouth-harbour.example' } },
  )) as unknown as [number];
  const subjectIds: number[] = [];
  for (let s = 0; s < 20; s++) {
    const [id] = (await sequelize.query(
      "INSERT INTO subjects (collection_id, kind, pref_label, alt_labels, concept_uri, status) VALUES (:c, :kind, :label, '[]', :uri, 'active')",
      { replacements: { c: c.id, kind: s === 0 ? 'form' : 'subject', label: `bench subject ${s}`, uri: `https://kestrelmouth-harbour.example/vocabulary/bench/${s}` } },
    )) as unknown as [number];
    subjectIds.push(id);
  }
  const BATCH = 2000;
  for (let start = 0; start < N; start += BATCH) {
    const items: string[] = [];
    const params: unknown[] = [];
    for (let i = start; i < Math.min(N, start + BATCH); i++) {
      const approved = i % 5 < 3;
      items.push('(?, ?, ?, ?, ?, ?, ?, ?, ?, ?)');
      params.push(
        c.id,
        `BENCH-${String(i).padStart(6, '0')}`,
        `plate-${String(i).padStart(6, '0')}.tif`,
        approved ? 'approved' : 'suggested',
        approved ? `An engraving of the harbour at Kestrelmouth, plate ${i}, with the pier, the lighthouse and two fishing boats.` : null,
        approved && i % 7 === 0 ? `The plate shows the quay from the north, ${i}. Carts wait by the fish market; gulls over the water, and a ship "in full sail" beyond the breakwater.` : null,
        approved ? editorId : null,
        approved ? new Date(Date.UTC(2026, 10, 1) + (i % 28) * 86_400_000) : null,
        'Plate from the harbour series',
        new Date(Date.UTC(2026, 9, 1)),
      );
    }
    await sequelize.query(`INSERT INTO items (collection_id, identifier, file_name, state, alt_text, long_description, approved_by, approved_at, caption, created_at) VALUES ${items.join(',')}`, { replacements: params });
    const [first] = await sequelize.query<{ id: number }>('SELECT MIN(id) AS id FROM items WHERE collection_id = :c AND identifier = :ident', {
      type: QueryTypes.SELECT,
      replacements: { c: c.id, ident: `BENCH-${String(start).padStart(6, '0')}` },
    });
    const suggestions: string[] = [];
    const sp: unknown[] = [];
    for (let k = 0; k < Math.min(BATCH, N - start); k++) {
      const itemId = Number(first!.id) + k;
      for (const [j, state] of (['accepted', k % 3 === 0 ? 'rejected' : 'proposed'] as const).entries()) {
        suggestions.push('(?, ?, ?, ?, ?, ?)');
        sp.push(itemId, subjectIds[(k + j * 7) % subjectIds.length], 0.6, state, state === 'proposed' ? null : editorId, state === 'proposed' ? null : new Date(Date.UTC(2026, 10, 1) + (k % 28) * 86_400_000));
      }
    }
    await sequelize.query(`INSERT INTO suggestions (item_id, subject_id, probability, state, decided_by, decided_at) VALUES ${suggestions.join(',')}`, { replacements: sp });
    if ((start / BATCH) % 10 === 0) process.stderr.write(`generated ${start + BATCH} of ${N} items\n`);
  }
  process.stderr.write(`generated ${N} items in ${((performance.now() - started) / 1000).toFixed(1)} s\n`);
  return c;
}

const collection = await ensureData();
const mb = (bytes: number) => (bytes / 1_048_576).toFixed(1);
const CHECKPOINTS = [10_000, 50_000, 100_000].filter((n) => n <= N).concat(N > 100_000 ? [N] : []);

async function measure(kind: string, run: (filename: string, onProgress: (done: number) => void) => Promise<{ rows: number }>): Promise<void> {
  const filename = join(tmpdir(), `cartouche-bench-${kind}-${process.pid}`);
  const lines: string[] = [];
  gc();
  let peak = process.memoryUsage().rss;
  const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 20);
  const t0 = performance.now();
  let lastT = t0;
  let lastRows = 0;
  let lastCpu = process.cpuUsage();
  let next = 0;
  const rssAtStart = process.memoryUsage().rss;
  const { rows } = await run(filename, (done) => {
    peak = Math.max(peak, process.memoryUsage().rss);
    while (next < CHECKPOINTS.length && done >= CHECKPOINTS[next]!) {
      const now = performance.now();
      const cpu = process.cpuUsage(lastCpu);
      const cpuMsPer1000 = ((cpu.user + cpu.system) / 1000 / (done - lastRows)) * 1000;
      const rss = process.memoryUsage().rss;
      gc();
      const live = process.memoryUsage().heapUsed;
      lines.push(
        `| ${kind} | ${CHECKPOINTS[next]!.toLocaleString('en-GB')} | ${((now - t0) / 1000).toFixed(1)} | ${Math.round(done / ((now - t0) / 1000)).toLocaleString('en-GB')} | ${Math.round((done - lastRows) / ((now - lastT) / 1000)).toLocaleString('en-GB')} | ${cpuMsPer1000.toFixed(0)} | ${mb(rss)} | ${mb(peak)} | ${mb(live)} |`,
      );
      lastT = performance.now();
      lastCpu = process.cpuUsage();
      lastRows = done;
      next++;
    }
  });
  clearInterval(sampler);
  const size = (await stat(filename)).size;
  await rm(filename, { force: true });
  console.log(lines.join('\n'));
  console.log(`| ${kind} | done: ${rows.toLocaleString('en-GB')} rows | ${((performance.now() - t0) / 1000).toFixed(1)} s | file ${mb(size)} MB | RSS at start ${mb(rssAtStart)} MB, peak ${mb(peak)} MB | | | | |`);
}

console.log(`\nLedger benchmark: ${N.toLocaleString('en-GB')} items, database ${values.db}, Node ${process.version}, pages of 1 000 items by keyset\n`);
console.log('| export | rows | elapsed s | rows/s so far | rows/s last stretch | CPU ms per 1 000 rows (this process) | RSS MB | peak RSS MB so far | live heap MB after GC |');
console.log('| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |');
const period = { from: '2026-11-01', to: null };
const kinds = new Set(String(values.kinds).split(','));
if (kinds.has('ledger')) await measure('ledger', (filename, onProgress) => writeLedger(sequelize, { collection, period, filename, onProgress }));
if (kinds.has('csv')) await measure('csv', (filename, onProgress) => writeItemsCsv(sequelize, { collection, period, filename, onProgress }));
if (kinds.has('xmp')) await measure('xmp', (filename, onProgress) => writeXmpZip(sequelize, { collection, period, filename, toolkit: 'Cartouche bench', onProgress }));
await sequelize.close();
