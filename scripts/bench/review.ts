/**
 * Review-desk benchmark: `npx tsx scripts/bench/review.ts [--items 20000] [--ocr 8] [--repeats 10]`
 *
 * 1. OCR as the night shift's text stage does it: demo scans of the three demo collections (`--ocr` with visible
 *    lettering from each, plus two without), drawn at 3000 px like a scan and made into the 1600 px review JPEG
 *    the way intake makes it, read by `readImageText` (the stage's settings) on one worker one after another and
 *    on the stage's pool (`ocrWorkers()`, CARTOUCHE_OCR_WORKERS) at once. A table per configuration: wall ms per
 *    scan (after a warming read on every worker), CPU ms per scan (all threads of the process; on a shared machine
 *    read this one), and quality against the words the demo drew (`scene.visibleText`): words found, and other
 *    words kept (misreadings and stray letters). A first row reads with the settings used before (page
 *    segmentation mode 6, one worker) for comparison.
 * 2. Catalogue and queue against MariaDB: a generated collection of N items with three proposals each —
 *    the first search-text build, a FULLTEXT search, a rebuild with nothing changed, the review queue in
 *    uncertainty order and by identifier. Runs only against a database whose name ends in `_test`
 *    (CARTOUCHE_DB_NAME), and removes its collection afterwards.
 */
import { availableParallelism } from 'node:os';
import { parseArgs } from 'node:util';
import sharp from 'sharp';
import { QueryTypes } from 'sequelize';
import { loadConfig } from '../../server/src/config.ts';
import { openDatabase } from '../../server/src/db/index.ts';
import { createMigrator } from '../../server/src/db/migrator.ts';
import { Collection, Subject } from '../../server/src/models/index.ts';
import { searchCatalogue, syncStaleSearchText } from '../../server/src/services/catalogue.ts';
import { createOcrWorker, OCR_ENGINE, OCR_PAGE_SEGMENTATION, ocrWorkers, readImageText } from '../../server/src/services/ocr.ts';
import { reviewQueue } from '../../server/src/services/review.ts';
import { buildDemoScenario, renderItemImage } from '../demo/index.ts';
import { refreshCollectionReviewMargins } from '../../server/src/models/review-margin.ts';

const { values } = parseArgs({ options: { items: { type: 'string', default: '20000' }, ocr: { type: 'string', default: '8' }, repeats: { type: 'string', default: '10' } } });
const N = Number(values.items);
const OCR_N = Number(values.ocr);
const R = Number(values.repeats);
const rows: Array<[string, string, string]> = [];
let peak = process.memoryUsage().rss;
const sample = () => (peak = Math.max(peak, process.memoryUsage().rss));

async function median(fn: () => Promise<unknown>, repeats: number): Promise<{ median: number; max: number }> {
  const t: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const s = performance.now();
    await fn();
    t.push(performance.now() - s);
    sample();
  }
  t.sort((a, b) => a - b);
  return { median: t[Math.floor(t.length / 2)]!, max: t[t.length - 1]! };
}
const ms = (x: number) => `${x.toFixed(1)} ms`;

// ---------------------------------------------------------------- OCR
{
  const wordsOf = (text: string) => text.toUpperCase().split(/[^\p{L}\p{N}]+/u).filter((w) => w.length >= 2);
  const scans: Array<{ view: Buffer; words: Set<string> }> = [];
  for (const c of buildDemoScenario().collections) {
    const lettered = c.items.filter((i) => i.scene.visibleText.length > 0).slice(0, OCR_N);
    const plain = c.items.filter((i) => i.scene.visibleText.length === 0).slice(0, 2);
    for (const item of [...lettered, ...plain]) {
      const scan = await renderItemImage(item, c.medium, { width: 3000 });
      // as intake makes the review image (services/ingest/derivatives.ts): 1600 px long side, JPEG quality 84
      const view = await sharp(scan.data).resize(1600, 1600, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 84 }).toBuffer();
      scans.push({ view, words: new Set(item.scene.visibleText.flatMap(wordsOf)) });
    }
  }
  const table: string[][] = [];
  // before: page segmentation left at the library's default (6, one uniform block: the same output as unset), one worker
  const configurations: Array<{ label: string; workers: number; segmentation?: string }> = [
    { label: 'before: mode 6 (library default), 1 worker', workers: 1, segmentation: '6' },
    { label: `mode ${OCR_PAGE_SEGMENTATION}, 1 worker, one scan after another`, workers: 1 },
    ...(ocrWorkers() > 1 ? [{ label: `mode ${OCR_PAGE_SEGMENTATION}, ${ocrWorkers()} workers at once: the text stage`, workers: ocrWorkers() }] : []),
  ];
  for (const { label, workers, segmentation } of configurations) {
    const s0 = performance.now();
    const pool = await Promise.all(Array.from({ length: workers }, () => createOcrWorker()));
    const startMs = performance.now() - s0;
    if (segmentation) for (const w of pool) await w.setParameters({ tessedit_pageseg_mode: segmentation as never });
    await Promise.all(pool.map((w, i) => readImageText(w, scans[i % scans.length]!.view)));
    let next = 0;
    let found = 0;
    let expected = 0;
    let other = 0;
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    await Promise.all(
      pool.map(async (worker) => {
        for (let i = next++; i < scans.length; i = next++) {
          const reading = await readImageText(worker, scans[i]!.view);
          const got = new Set(wordsOf(reading.text));
          for (const w of scans[i]!.words) if (got.has(w)) found++;
          expected += scans[i]!.words.size;
          for (const w of got) if (!scans[i]!.words.has(w)) other++;
          sample();
        }
      }),
    );
    const wall = (performance.now() - t0) / scans.length;
    const cpu = process.cpuUsage(cpu0);
    await Promise.all(pool.map((w) => w.terminate()));
    table.push([label, ms(startMs), ms(wall), ms((cpu.user + cpu.system) / 1000 / scans.length), `${found} of ${expected} (${((100 * found) / Math.max(1, expected)).toFixed(1)} %)`, String(other)]);
    rows.push(['ocr', `${label}: wall per review-size scan`, ms(wall)]);
  }
  const head = ['configuration', 'worker start', 'wall ms/scan', 'CPU ms/scan', 'drawn words found', 'other words kept'];
  const widths = head.map((h, i) => Math.max(h.length, ...table.map((r) => r[i]!.length)));
  console.log(`\nOCR: ${scans.length} demo scans at review size (1600 px), ${OCR_ENGINE}, ${availableParallelism()} core(s)`);
  for (const r of [head, ...table]) console.log(r.map((x, i) => x.padEnd(widths[i]!)).join('  '));
}

// ---------------------------------------------------------------- catalogue and queue
const config = loadConfig();
if (!config.db.name.endsWith('_test')) {
  console.log(`skipping the database part: ${config.db.name} does not end in _test`);
} else {
  const sequelize = openDatabase(config.db, { pool: 2 });
  await createMigrator(sequelize).up();
  const slug = `bench-review-${Date.now()}`;
  const c = await Collection.create({ slug, name: 'Review bench', description: 'generated by scripts/bench/review.ts', medium: 'engraving', houseStyle: '', dropFolder: null, archivedAt: null });
  try {
    const words = ['harbour', 'pier', 'lighthouse', 'schooner', 'quay', 'net', 'crane', 'storm', 'regatta', 'ferry', 'barque', 'dock'];
    const subjects = await Promise.all(['lighthouse', 'sailing ship', 'crane'].map((prefLabel, i) => Subject.create({ collectionId: c.id, broaderId: null, kind: 'subject', prefLabel, altLabels: [`alias${i}`], notation: null, scopeNote: null, altTextPhrase: null, conceptUri: null, status: 'active' })));
    const s0 = performance.now();
    for (let start = 0; start < N; start += 2000) {
      const batch = Array.from({ length: Math.min(2000, N - start) }, (_, k) => {
        const i = start + k;
        return `(${c.id}, 'BENCH-${String(i).padStart(6, '0')}', 'bench-${i}.jpg', ${sequelize.escape(`The ${words[i % 12]} and the ${words[(i * 7) % 12]} at dusk, plate ${i}`)}, 'suggested', ${i % 5 === 0 ? sequelize.escape(`NOTICE ${words[(i * 3) % 12]}`) : 'NULL'})`;
      });
      await sequelize.query(`INSERT INTO items (collection_id, identifier, file_name, caption, state, ocr_text) VALUES ${batch.join(',')}`);
    }
    const ids = (await sequelize.query<{ id: number }>('SELECT id FROM items WHERE collection_id = :id', { type: QueryTypes.SELECT, replacements: { id: c.id } })).map((r) => Number(r.id));
    for (const subject of subjects) {
      for (let start = 0; start < ids.length; start += 5000) {
        const part = ids.slice(start, start + 5000).map((id) => `(${id}, ${subject.id}, ${Math.random().toFixed(4)}, ${Math.random().toFixed(4)}, 'proposed')`);
        await sequelize.query(`INSERT INTO suggestions (item_id, subject_id, score, probability, state) VALUES ${part.join(',')}`);
      }
    }
    rows.push(['setup', `${N} items, ${N * 3} proposals inserted`, ms(performance.now() - s0)]);
    let t = performance.now();
    // the proposals went in by SQL, as the suggest stage writes them: the same pass over the collection follows
    await refreshCollectionReviewMargins(sequelize, c.id);
    rows.push(['queue', 'review margins of every item (the suggest stage\'s closing pass)', ms(performance.now() - t)]);
    t = performance.now();
    await syncStaleSearchText(sequelize, c.id);
    rows.push(['catalogue', 'first search-text build (every item)', ms(performance.now() - t)]);
    t = performance.now();
    await syncStaleSearchText(sequelize, c.id);
    rows.push(['catalogue', 'check for stale search text, nothing changed', ms(performance.now() - t)]);
    const q = await median(() => searchCatalogue(sequelize, { collectionId: c.id, q: 'lighthouse dusk', page: 1, pageSize: 25 }), R);
    rows.push(['catalogue', `search "lighthouse dusk", page 1 (median of ${R}; includes the stale check)`, `${ms(q.median)} (max ${ms(q.max)})`]);
    const p = await median(() => searchCatalogue(sequelize, { collectionId: c.id, q: 'notice regatta', state: 'suggested', page: 3, pageSize: 25 }), R);
    rows.push(['catalogue', `search "notice regatta" in OCR text, page 3`, `${ms(p.median)} (max ${ms(p.max)})`]);
    const u = await median(() => reviewQueue(sequelize, { id: 0 }, { collectionId: c.id, sort: 'uncertainty', limit: 50, offset: 0 }), R);
    rows.push(['queue', `first 50 by uncertainty (median of ${R})`, `${ms(u.median)} (max ${ms(u.max)})`]);
    const b = await median(() => reviewQueue(sequelize, { id: 0 }, { collectionId: c.id, sort: 'uncertainty', subjectId: subjects[1]!.id, minProbability: 0.4, maxProbability: 0.7, limit: 50, offset: 0 }), R);
    rows.push(['queue', 'first 50, one subject, band 40–70 %', `${ms(b.median)} (max ${ms(b.max)})`]);
    const i = await median(() => reviewQueue(sequelize, { id: 0 }, { collectionId: c.id, sort: 'identifier', limit: 50, offset: 500 }), R);
    rows.push(['queue', '50 by identifier from offset 500', `${ms(i.median)} (max ${ms(i.max)})`]);
  } finally {
    await c.destroy();
    await sequelize.close();
  }
}

rows.push(['process', 'peak RSS', `${(peak / 1024 / 1024).toFixed(0)} MB`]);
const w = [Math.max(...rows.map((r) => r[0].length)), Math.max(...rows.map((r) => r[1].length))];
console.log(`\n${'part'.padEnd(w[0]!)}  ${'what'.padEnd(w[1]!)}  time`);
for (const [a, b, c] of rows) console.log(`${a.padEnd(w[0]!)}  ${b.padEnd(w[1]!)}  ${c}`);
