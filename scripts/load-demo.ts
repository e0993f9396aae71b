// Loads the invented demo scenario (Kestrelmouth Harbour Museum) into an empty database:
//   npm run demo:load                 load when the database has no collections yet
//   npm run demo:load -- --print-sign-ins   print the demo people and how to sign in
import { pathToFileURL } from 'node:url';
import argon2 from 'argon2';
import type { Sequelize } from 'sequelize';
import { loadConfig } from '../server/src/config.ts';
import { openDatabase } from '../server/src/db/index.ts';
import { Collection, Example, Item, Subject, Suggestion, User } from '../server/src/models/index.ts';
import { startRun } from '../server/src/services/runs.ts';
import { Storage } from '../server/src/services/storage.ts';
import { buildDemoScenario, renderItemImage, type DemoScenario } from './demo/index.ts';
import { loadReviewDemoState } from './demo/review-state.ts';

export interface DemoLoadResult {
  loaded: boolean;
  reason?: string;
  people: number;
  collections: number;
  subjects: number;
  items: number;
}

const DAY_MS = 86_400_000;

/**
 * The demo's calendar, relative to the day it is loaded, so the ledger's weekly figures show a history whenever
 * someone runs it: the scans came in twelve weeks ago, and the scenario's approvals (in their own order and
 * spacing) are spread over the eleven weeks since, the last one yesterday.
 */
export function demoDates(collections: DemoScenario['collections'], now: Date): { intakeAt: Date; approvedAt: (iso: string) => Date } {
  const times = collections.flatMap((c) => c.items.flatMap((i) => (i.reviewed ? [Date.parse(i.reviewed.approvedAt)] : [])));
  const first = Math.min(...times);
  const span = Math.max(1, Math.max(...times) - first);
  const end = now.getTime() - DAY_MS;
  const start = now.getTime() - 77 * DAY_MS;
  return {
    intakeAt: new Date(now.getTime() - 84 * DAY_MS),
    approvedAt: (iso) => new Date(times.length === 0 ? end : start + ((Date.parse(iso) - first) / span) * (end - start)),
  };
}

/**
 * Loads the scenario in one transaction (all or nothing). Images are rendered and stored first, by content
 * hash, so an interrupted load leaves at most unreferenced files behind, never half a catalogue.
 */
export async function loadDemoScenario(
  sequelize: Sequelize,
  storage: Storage,
  opts: { scenario?: DemoScenario; itemsPerCollection?: number; onProgress?: (done: number, total: number) => void; now?: Date } = {},
): Promise<DemoLoadResult> {
  const existing = await Collection.count();
  if (existing > 0) {
    return { loaded: false, reason: `the database already holds ${existing} collection(s)`, people: 0, collections: 0, subjects: 0, items: 0 };
  }
  const scenario = opts.scenario ?? buildDemoScenario();
  const collections = scenario.collections.map((c) => ({
    ...c,
    items: opts.itemsPerCollection === undefined ? c.items : c.items.slice(0, opts.itemsPerCollection),
  }));

  const dates = demoDates(collections, opts.now ?? new Date());

  // 1. images (outside the transaction: slow, idempotent)
  const total = collections.reduce((n, c) => n + c.items.length, 0);
  const images = new Map<string, { key: string; mime: string; width: number; height: number; size: number }>();
  let done = 0;
  const queue = collections.flatMap((c) => c.items.map((item) => ({ c, item })));
  // two renders at a time keep both cores busy (librsvg and sharp work off the main thread)
  const renderNext = async (): Promise<void> => {
    for (let job = queue.shift(); job; job = queue.shift()) {
      const img = await renderItemImage(job.item, job.c.medium);
      images.set(`${job.c.slug}/${job.item.identifier}`, { key: await storage.put(img.data), mime: img.mime, width: img.width, height: img.height, size: img.data.length });
      opts.onProgress?.(++done, total);
    }
  };
  await Promise.all([renderNext(), renderNext()]);

  // 2. password hashes (argon2id), one per distinct demo password
  const hashes = new Map<string, string>();
  for (const p of scenario.people) {
    if (!hashes.has(p.password)) hashes.set(p.password, await argon2.hash(p.password, { type: argon2.argon2id }));
  }

  // 3. the catalogue, all or nothing
  let subjectCount = 0;
  let itemCount = 0;
  await sequelize.transaction(async (transaction) => {
    const users = new Map<string, User>();
    for (const p of scenario.people) {
      const u = await User.create(
        { email: p.email, displayName: p.displayName, role: p.role, passwordHash: hashes.get(p.password) ?? null, samlNameId: null, lastSignInAt: null },
        { transaction },
      );
      users.set(p.email, u);
    }
    for (const c of collections) {
      const collection = await Collection.create(
        {
          slug: c.slug,
          name: c.name,
          description: c.description,
          medium: c.medium,
          altTextLanguage: c.altTextLanguage,
          houseStyle: c.houseStyle,
          dropFolder: null,
          archivedAt: null,
        },
        { transaction },
      );
      const subjects = new Map<string, Subject>();
      const exampleMedium = c.medium === 'photograph' ? 'photo' : 'illustration';
      // parents before children: repeat passes until every broader subject exists
      let pending = [...c.subjects];
      while (pending.length) {
        const ready = pending.filter((s) => !s.broaderKey || subjects.has(s.broaderKey));
        if (ready.length === 0) throw new Error(`collection ${c.slug}: broader subjects form a cycle or are missing`);
        for (const s of ready) {
          const subject = await Subject.create(
            {
              collectionId: collection.id,
              broaderId: s.broaderKey ? (subjects.get(s.broaderKey)?.id ?? null) : null,
              kind: s.kind,
              prefLabel: s.prefLabel,
              altLabels: s.altLabels,
              notation: s.notation,
              scopeNote: s.scopeNote,
              altTextPhrase: s.altTextPhrase,
              conceptUri: `https://${scenario.institution.domain}/vocabulary/${c.slug}/${s.key}`,
              status: s.status,
            },
            { transaction },
          );
          subjects.set(s.key, subject);
        }
        pending = pending.filter((s) => !ready.includes(s));
      }
      subjectCount += subjects.size;

      for (const it of c.items) {
        const img = images.get(`${c.slug}/${it.identifier}`);
        if (!img) throw new Error(`no image rendered for ${it.identifier}`);
        const reviewer = it.reviewed ? users.get(it.reviewed.reviewerEmail) : undefined;
        if (it.reviewed && !reviewer) throw new Error(`${it.identifier}: reviewer ${it.reviewed.reviewerEmail} is not a demo person`);
        const item = await Item.create(
          {
            collectionId: collection.id,
            identifier: it.identifier,
            fileName: it.fileName,
            fileKey: img.key,
            mimeType: img.mime,
            width: img.width,
            height: img.height,
            byteSize: img.size,
            caption: it.caption,
            creator: it.creator,
            dateText: it.dateText,
            rights: it.rights,
            captionFlagged: Boolean(it.captionFlag),
            captionFlagNote: it.captionFlag ?? null,
            state: it.reviewed ? 'approved' : 'new',
            altText: it.reviewed ? it.reviewed.altText : null,
            longDescription: null,
            decorative: it.reviewed?.decorative ?? false,
            ocrText: null,
            approvedBy: reviewer?.id ?? null,
            approvedAt: it.reviewed ? dates.approvedAt(it.reviewed.approvedAt) : null,
            createdAt: dates.intakeAt,
          },
          { transaction },
        );
        itemCount++;
        // a reviewed item carries the subjects its editor gave it, as the review desk will record them
        if (it.reviewed && reviewer) {
          for (const key of it.truth) {
            const subject = subjects.get(key);
            if (!subject) throw new Error(`${it.identifier}: unknown subject ${key}`);
            await Suggestion.create(
              {
                itemId: item.id,
                subjectId: subject.id,
                subjectModelId: null,
                runId: null,
                score: null,
                probability: null,
                state: 'added',
                decidedBy: reviewer.id,
                decidedAt: dates.approvedAt(it.reviewed.approvedAt),
              },
              { transaction },
            );
          }
        }
      }
      // the archivists' starting point: up to three items per subject promoted to examples of it
      const itemIds = new Map((await Item.findAll({ where: { collectionId: collection.id }, attributes: ['id', 'identifier', 'fileKey'], transaction })).map((i) => [i.identifier, i]));
      for (const [key, subject] of subjects) {
        if (subject.status !== 'active') continue;
        const chosen = c.items.filter((it) => it.truth.includes(key)).sort((a, b) => Number(Boolean(b.reviewed)) - Number(Boolean(a.reviewed))).slice(0, 3);
        for (const it of chosen) {
          const item = itemIds.get(it.identifier)!;
          await Example.create({ subjectId: subject.id, medium: exampleMedium, origin: 'promoted', fileKey: item.fileKey!, itemId: item.id, createdBy: null }, { transaction });
        }
      }
    }
  });
  // the review desk: a double-review share and blind second reviews of its approved items
  await loadReviewDemoState(sequelize);
  // the first night-shift run of each collection: the worker reads the scans, builds the subject models and suggests
  for (const c of await Collection.findAll()) await startRun(sequelize, c.id, 'manual', null);
  return { loaded: true, people: scenario.people.length, collections: collections.length, subjects: subjectCount, items: itemCount };
}

export function describeSignIns(scenario: DemoScenario, urls: { app: string; idp: string }): string {
  const width = Math.max(...scenario.people.map((p) => p.email.length));
  const lines = [
    `Demo scenario: ${scenario.institution.name} (invented). Sign in at ${urls.app}`,
    `  local accounts (password for all: ${[...new Set(scenario.people.map((p) => p.password))].join(', ')}):`,
    ...scenario.people.map((p) => `    ${p.email.padEnd(width)}  ${p.role.padEnd(9)}  ${p.displayName}`),
    `  single sign-on: choose a demo identity on the local identity provider at ${urls.idp}`,
  ];
  return lines.join('\n');
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const config = loadConfig();
  if (process.argv.includes('--print-sign-ins')) {
    const idpPort = process.env.CARTOUCHE_IDP_PORT ?? '4312';
    console.log(describeSignIns(buildDemoScenario(), { app: config.publicUrl, idp: `http://127.0.0.1:${idpPort}/` }));
  } else {
    const sequelize = openDatabase(config.db, { pool: 2 });
    try {
      const started = Date.now();
      const result = await loadDemoScenario(sequelize, new Storage(config.storageDir), {
        onProgress: (done, total) => {
          if (done % 50 === 0 || done === total) process.stdout.write(`  demo images ${done}/${total}\r`);
        },
      });
      if (result.loaded) {
        console.log(
          `\nloaded the demo scenario in ${((Date.now() - started) / 1000).toFixed(1)} s: ${result.people} people, ${result.collections} collections, ${result.subjects} subjects, ${result.items} items`,
        );
      } else {
        console.log(`demo scenario not loaded: ${result.reason}`);
      }
    } finally {
      await sequelize.close();
    }
  }
}
