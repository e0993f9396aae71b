import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import { can, type Access } from '../../server/src/auth/permissions.ts';
import type { AppConfig } from '../../server/src/config.ts';
import type { RouteRecord } from '../../server/src/http/routes.ts';
import { createMailer } from '../../server/src/mail/mailer.ts';
import { listMessages } from '../../server/src/mail/mailbox.ts';
import { ROLES, type Role } from '../../server/src/models/index.ts';
import { ExportFile } from '../../server/src/models/index.ts';
import { issueToken } from '../../server/src/services/people.ts';
import { startRun } from '../../server/src/services/runs.ts';
import sharp from 'sharp';
import { Collection, Example, Item } from '../../server/src/models/index.ts';
import { embedStoredFile, processEmbedder } from '../../server/src/services/features.ts';
import { ingestFile, intakeLimits } from '../../server/src/services/ingest.ts';
import { previewImport } from '../../server/src/services/metadata-import.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { startTestSmtp } from '../helpers/mail.ts';
import { TEST_PASSWORD, makePerson, signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;
let app: CartoucheApp;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  smtp = await startTestSmtp();
  config = { ...config, smtp: { ...config.smtp, port: smtp.port }, mailDir: smtp.mailDir };
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
});
afterAll(async () => {
  await smtp.close();
  await sequelize.close();
});

interface Sample {
  path?: string;
  body?: object;
  form?: Record<string, string>;
  /** multipart file parts */
  files?: Array<{ field: string; name: string; data: Buffer }>;
  /** multipart text fields sent with the files */
  fields?: Record<string, string>;
}

/** a subject with one stored, embedded example */
async function subjectWithExample(): Promise<{ subjectId: number; exampleId: number }> {
  const subject = await makeSubject(await makeCollection());
  const storage = new Storage(config.storageDir);
  const fileKey = await storage.put(await samplePng(++shade));
  const example = await Example.create({ subjectId: subject.id, medium: 'sketch', origin: 'uploaded', fileKey, itemId: null, createdBy: null });
  await embedStoredFile(await processEmbedder(), storage, { type: 'example', id: example.id }, fileKey);
  return { subjectId: subject.id, exampleId: example.id };
}

const samplePng = (shade: number) => sharp({ create: { width: 24, height: 16, channels: 3, background: { r: shade % 256, g: 90, b: 120 } } }).png().toBuffer();
let shade = 0;
/** an item with a scan and its derivatives, brought in through the intake service */
async function ingestedItem(): Promise<number> {
  const c = await makeCollection();
  const outcome = await ingestFile(
    { sequelize, storage: new Storage(config.storageDir), limits: intakeLimits({}) },
    { collectionId: c.id, fileName: 'matrix.png', source: { buffer: await samplePng(++shade) }, origin: 'upload' },
  );
  if (outcome.outcome !== 'ingested') throw new Error(`sample scan not ingested: ${JSON.stringify(outcome)}`);
  return outcome.itemId;
}
/** a finished export with its file in storage */
async function readyExport(): Promise<ExportFile> {
  const c = await makeCollection();
  const fileKey = await new Storage(config.storageDir).put(Buffer.from(`Identifier\r\nMATRIX-${++shade}\r\n`));
  return ExportFile.create({ collectionId: c.id, kind: 'items_csv', periodFrom: null, periodTo: null, status: 'ready', fileKey, fileName: 'items.csv', byteSize: 20, rowCount: 1, requestedBy: null, error: null, finishedAt: new Date() });
}
/** a collection with one item and a previewed sheet that would change it */
async function previewedImport(): Promise<{ collectionId: number; importId: number }> {
  const itemId = await ingestedItem();
  const { collectionId } = (await Item.findByPk(itemId))!;
  const preview = await previewImport({ collectionId, fileName: 'matrix.csv', data: Buffer.from('file name,caption\nmatrix.png,A harbour plate\n'), actorId: null, maxRows: 10 });
  return { collectionId, importId: preview.id };
}


/** review desk: an item with a proposal, in a collection with a form and a subject */
async function reviewScene(opts: { scan?: boolean; confirmed?: boolean } = {}): Promise<{ collectionId: number; itemId: number; version: number; subjectId: number; formId: number }> {
  const itemId = opts.scan ? await ingestedItem() : (await makeItem(await makeCollection(), { state: 'suggested' })).id;
  const item = (await Item.findByPk(itemId))!;
  const c = (await Collection.findByPk(item.collectionId))!;
  const subject = await makeSubject(c, { prefLabel: `matrix subject ${++shade}` });
  const form = await makeSubject(c, { prefLabel: `matrix form ${++shade}`, kind: 'form' });
  await makeSuggestion(item, subject, opts.confirmed ? 'accepted' : 'proposed');
  return { collectionId: c.id, itemId, version: (await Item.findByPk(itemId))!.version, subjectId: subject.id, formId: form.id };
}
/** an item of a collection that reviews every item twice, approved by someone else */
async function approvedForSecondReview(): Promise<{ itemId: number; subjectId: number }> {
  const s = await reviewScene();
  await sequelize.query('INSERT INTO review_settings (collection_id, double_review_share) VALUES (:id, 1)', { replacements: { id: s.collectionId } });
  const first = await makePerson('editor');
  await Item.update({ state: 'approved', approvedBy: first.id, approvedAt: new Date(), altText: 'Engraving of a pier' }, { where: { id: s.itemId } });
  return { itemId: s.itemId, subjectId: s.subjectId };
}

/**
 * A valid request for every route (a new route without one fails the first test). Builders make fresh
 * targets per call, because a sample may change what it touches.
 */
const samples: Record<string, () => Promise<Sample>> = {
  'get /api/health': async () => ({}),
  'get /api/auth/session': async () => ({}),
  'post /api/auth/login': async () => ({ body: { email: (await makePerson('editor')).email, password: TEST_PASSWORD } }),
  'post /api/auth/logout': async () => ({}),
  'post /api/auth/password-reset': async () => ({ body: { email: 'someone@people.example' } }),
  'get /api/auth/tokens/:token': async () => ({ path: `/api/auth/tokens/${await issueToken((await makePerson('editor')).id, 'password_reset', null)}` }),
  'post /api/auth/password': async () => ({ body: { token: await issueToken((await makePerson('editor')).id, 'password_reset', null), password: 'a long enough passphrase' } }),
  'get /api/auth/saml/login': async () => ({}),
  'post /api/auth/saml/acs': async () => ({ form: { SAMLResponse: Buffer.from('<not-saml/>').toString('base64') } }),
  'get /api/auth/saml/metadata': async () => ({}),
  'get /api/collections': async () => ({}),
  'get /api/collections/:id/schedule': async () => ({ path: `/api/collections/${(await makeCollection()).id}/schedule` }),
  'put /api/collections/:id/schedule': async () => ({
    path: `/api/collections/${(await makeCollection()).id}/schedule`,
    body: { scheduleCron: '30 1 * * 1-5', scheduleTimezone: 'Europe/London', scheduleEnabled: true, dropFolder: '' },
  }),
  'get /api/collections/:id/runs': async () => ({ path: `/api/collections/${(await makeCollection()).id}/runs` }),
  'post /api/collections/:id/runs': async () => ({ path: `/api/collections/${(await makeCollection()).id}/runs` }),
  'get /api/runs/:id': async () => ({ path: `/api/runs/${(await startRun(sequelize, (await makeCollection()).id, 'manual', null)).id}` }),
  'post /api/runs/:id/cancel': async () => ({ path: `/api/runs/${(await startRun(sequelize, (await makeCollection()).id, 'manual', null)).id}/cancel` }),
  'get /api/collections/:id/subjects': async () => ({ path: `/api/collections/${(await makeCollection()).id}/subjects` }),
  'get /api/subjects/:id': async () => ({ path: `/api/subjects/${(await makeSubject(await makeCollection())).id}` }),
  'post /api/subjects/:id/examples': async () => ({
    path: `/api/subjects/${(await makeSubject(await makeCollection())).id}/examples`,
    fields: { medium: 'sketch' },
    files: [{ field: 'files', name: 'sketch.png', data: await samplePng(++shade) }],
  }),
  'delete /api/examples/:id': async () => ({ path: `/api/examples/${(await subjectWithExample()).exampleId}` }),
  'get /api/examples/:id/image': async () => ({ path: `/api/examples/${(await subjectWithExample()).exampleId}/image` }),
  'get /api/subjects/:id/preview': async () => ({ path: `/api/subjects/${(await subjectWithExample()).subjectId}/preview` }),
  'post /api/subjects/:id/models': async () => ({ path: `/api/subjects/${(await subjectWithExample()).subjectId}/models`, body: { mode: 'from-examples' } }),
  'get /api/subjects/:id/models': async () => ({ path: `/api/subjects/${(await subjectWithExample()).subjectId}/models` }),
  'get /api/subjects/:id/history': async () => ({ path: `/api/subjects/${(await makeSubject(await makeCollection())).id}/history` }),
  // subject studio: collection settings, the vocabulary tree, the threshold estimate, vocabulary exchange
  'get /api/collections/archived': async () => ({}),
  'post /api/collections': async () => ({ body: { name: 'Matrix plates', slug: `matrix-${++shade}`, description: '', medium: 'engraving', altTextLanguage: 'en', altTextMaxLength: 125, houseStyle: '' } }),
  'get /api/collections/:id': async () => ({ path: `/api/collections/${(await makeCollection()).id}` }),
  'put /api/collections/:id': async () => {
    const c = await makeCollection();
    return { path: `/api/collections/${c.id}`, body: { name: c.name, slug: c.slug, description: '', medium: 'engraving', altTextLanguage: 'en', altTextMaxLength: 125, houseStyle: '', feedingSubjectIds: [], updatedAt: c.updatedAt.toISOString() } };
  },
  'post /api/collections/:id/archive': async () => ({ path: `/api/collections/${(await makeCollection()).id}/archive` }),
  'post /api/collections/:id/restore': async () => ({ path: `/api/collections/${(await makeCollection({ archivedAt: new Date() })).id}/restore` }),
  'post /api/collections/:id/subjects': async () => ({
    path: `/api/collections/${(await makeCollection()).id}/subjects`,
    body: { prefLabel: 'bollard', altLabels: [], kind: 'subject', broaderId: null, notation: '', scopeNote: '', altTextPhrase: '', status: 'draft', feedsAltText: true, conceptUri: '' },
  }),
  'put /api/subjects/:id': async () => {
    const s = await makeSubject(await makeCollection());
    return { path: `/api/subjects/${s.id}`, body: { prefLabel: 'bollard', altLabels: [], kind: 'subject', broaderId: null, notation: '', scopeNote: '', altTextPhrase: '', status: 'active', feedsAltText: true, conceptUri: '', version: s.version } };
  },
  'post /api/subjects/:id/move': async () => {
    const c = await makeCollection();
    const top = await makeSubject(c);
    const s = await makeSubject(c);
    return { path: `/api/subjects/${s.id}/move`, body: { broaderId: top.id, version: s.version } };
  },
  'get /api/subjects/:id/estimate': async () => ({ path: `/api/subjects/${(await subjectWithExample()).subjectId}/estimate` }),
  'get /api/collections/:id/vocabulary': async () => ({ path: `/api/collections/${(await makeCollection()).id}/vocabulary?format=turtle` }),
  'post /api/collections/:id/vocabulary': async () => ({
    path: `/api/collections/${(await makeCollection()).id}/vocabulary`,
    files: [{ field: 'file', name: 'vocabulary.csv', data: Buffer.from('prefLabel,broader\nquay,\ncrane,quay\n') }],
  }),
  'get /api/people': async () => ({}),
  'post /api/people/invitations': async () => ({ body: { email: `invitee${Math.random().toString(36).slice(2)}@people.example`, displayName: 'Invitee', role: 'editor' } }),
  'patch /api/people/:id': async () => {
    const p = await makePerson('editor');
    return { path: `/api/people/${p.id}`, body: { role: 'manager', version: p.version } };
  },
  'post /api/people/:id/invitation': async () => {
    const p = await makePerson('editor');
    await p.update({ passwordHash: null });
    return { path: `/api/people/${p.id}/invitation` };
  },
  'get /api/mailbox': async () => ({}),
  'get /api/intake/settings': async () => ({}),
  'post /api/collections/:id/items/upload': async () => ({
    path: `/api/collections/${(await makeCollection()).id}/items/upload`,
    files: [{ field: 'files', name: 'plate.png', data: await samplePng(++shade) }],
  }),
  'get /api/items/:id/thumbnail': async () => ({ path: `/api/items/${await ingestedItem()}/thumbnail` }),
  'get /api/items/:id/view': async () => ({ path: `/api/items/${await ingestedItem()}/view` }),
  'post /api/collections/:id/imports': async () => {
    const { collectionId } = (await Item.findByPk(await ingestedItem()))!;
    return { path: `/api/collections/${collectionId}/imports`, files: [{ field: 'sheet', name: 'catalogue.csv', data: Buffer.from('file name,caption\nmatrix.png,A plate\n') }] };
  },
  'get /api/collections/:id/imports/:importId': async () => {
    const { collectionId, importId } = await previewedImport();
    return { path: `/api/collections/${collectionId}/imports/${importId}` };
  },
  'post /api/collections/:id/imports/:importId/apply': async () => {
    const { collectionId, importId } = await previewedImport();
    return { path: `/api/collections/${collectionId}/imports/${importId}/apply` };
  },
  'get /api/mailbox/:id': async () => {
    await createMailer(config).send({ to: 'matrix@people.example', subject: 'Matrix', text: 'A captured message.' });
    const [latest] = await listMessages(config.mailDir);
    return { path: `/api/mailbox/${latest!.id}` };
  },
  // ledger and exports
  'get /api/collections/:id/exports': async () => ({ path: `/api/collections/${(await makeCollection()).id}/exports` }),
  'post /api/collections/:id/exports': async () => ({ path: `/api/collections/${(await makeCollection()).id}/exports`, body: { kind: 'items_csv', periodFrom: '2026-11-23', periodTo: '2026-11-29' } }),
  'get /api/exports/:id': async () => ({ path: `/api/exports/${(await readyExport()).id}` }),
  'get /api/exports/:id/file': async () => ({ path: `/api/exports/${(await readyExport()).id}/file` }),
  'get /api/collections/:id/ledger-mail': async () => ({ path: `/api/collections/${(await makeCollection()).id}/ledger-mail` }),
  'put /api/collections/:id/ledger-mail': async () => ({ path: `/api/collections/${(await makeCollection()).id}/ledger-mail`, body: { enabled: true, weekday: 1, hour: 7 } }),
  'get /api/iiif/collections/:id/manifest': async () => ({ path: `/api/iiif/collections/${(await Item.findByPk(await ingestedItem()))!.collectionId}/manifest` }),
  'get /api/iiif/items/:id/:part': async () => ({ path: `/api/iiif/items/${await ingestedItem()}/canvas` }),
  'get /api/dashboard/coverage': async () => ({ path: '/api/dashboard/coverage?weeks=8' }),
  'get /api/collections/:id/dashboard': async () => ({ path: `/api/collections/${(await makeCollection()).id}/dashboard` }),
  // review desk and catalogue
  'get /api/review/queue': async () => ({ path: `/api/review/queue?collectionId=${(await reviewScene()).collectionId}` }),
  'get /api/review/items/:id': async () => ({ path: `/api/review/items/${(await reviewScene()).itemId}` }),
  'post /api/review/items/:id/subjects': async () => {
    const s = await reviewScene();
    return { path: `/api/review/items/${s.itemId}/subjects`, body: { version: s.version, subjectId: s.subjectId, decision: 'accept' } };
  },
  'put /api/review/items/:id/form': async () => {
    const s = await reviewScene();
    return { path: `/api/review/items/${s.itemId}/form`, body: { version: s.version, subjectId: s.formId } };
  },
  'put /api/review/items/:id/description': async () => {
    const s = await reviewScene();
    return { path: `/api/review/items/${s.itemId}/description`, body: { version: s.version, altText: 'Engraving of a pier', longDescription: '', decorative: false } };
  },
  'post /api/review/items/:id/approve': async () => {
    const s = await reviewScene();
    return { path: `/api/review/items/${s.itemId}/approve`, body: { version: s.version, altText: 'Engraving of a pier at low tide', longDescription: '', decorative: false } };
  },
  'post /api/review/items/:id/skip': async () => ({ path: `/api/review/items/${(await reviewScene()).itemId}/skip` }),
  'put /api/review/items/:id/caption-flag': async () => {
    const s = await reviewScene();
    return { path: `/api/review/items/${s.itemId}/caption-flag`, body: { version: s.version, flagged: true, note: 'Outdated term.' } };
  },
  'post /api/review/items/:id/examples': async () => {
    const s = await reviewScene({ scan: true, confirmed: true });
    return { path: `/api/review/items/${s.itemId}/examples`, body: { subjectId: s.subjectId } };
  },
  'post /api/review/items/:id/ocr': async () => ({ path: `/api/review/items/${(await reviewScene({ scan: true })).itemId}/ocr` }),
  'post /api/review/items/:id/second-review': async () => {
    const s = await approvedForSecondReview();
    return { path: `/api/review/items/${s.itemId}/second-review`, body: { present: [s.subjectId], absent: [] } };
  },
  'get /api/review/subjects': async () => ({ path: `/api/review/subjects?collectionId=${(await reviewScene()).collectionId}&q=matrix` }),
  'get /api/review/subjects/:id/grid': async () => ({ path: `/api/review/subjects/${(await reviewScene()).subjectId}/grid` }),
  'post /api/review/subjects/:id/grid': async () => {
    const s = await reviewScene();
    return { path: `/api/review/subjects/${s.subjectId}/grid`, body: { decisions: [{ itemId: s.itemId, version: s.version, decision: 'reject' }] } };
  },
  'get /api/review/collections/:id/second-reviews': async () => ({ path: `/api/review/collections/${(await reviewScene()).collectionId}/second-reviews` }),
  'get /api/review/collections/:id/settings': async () => ({ path: `/api/review/collections/${(await makeCollection()).id}/settings` }),
  'put /api/review/collections/:id/settings': async () => ({ path: `/api/review/collections/${(await makeCollection()).id}/settings`, body: { doubleReviewShare: 0.2 } }),
  'get /api/review/collections/:id/agreement': async () => ({ path: `/api/review/collections/${(await reviewScene()).collectionId}/agreement` }),
  'get /api/items': async () => ({ path: `/api/items?collectionId=${(await reviewScene()).collectionId}&q=matrix` }),
  'get /api/items/facets': async () => ({ path: `/api/items/facets?collectionId=${(await reviewScene()).collectionId}` }),
  'get /api/items/:id': async () => ({ path: `/api/items/${(await reviewScene()).itemId}` }),
};

const key = (r: RouteRecord) => `${r.method} ${r.path}`;

/** Every route Express itself knows under /api, read from the router stack (so nothing registered around the guard escapes). */
function expressRoutes(a: CartoucheApp): string[] {
  const out: string[] = [];
  const walk = (stack: Array<{ route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: unknown[] }; matchers?: unknown }>, prefix: string) => {
    for (const layer of stack) {
      if (layer.route) for (const m of Object.keys(layer.route.methods)) out.push(`${m} ${prefix}${layer.route.path}`);
      else if (layer.handle?.stack) walk(layer.handle.stack as typeof stack, prefix || '/api');
    }
  };
  walk((a as unknown as { router: { stack: Parameters<typeof walk>[0] } }).router.stack, '');
  return out.filter((r) => r.includes(' /api/'));
}

function expected(access: Access, role: Role | null): 'ok' | 401 | 403 {
  if (access.kind === 'public') return 'ok';
  if (role === null) return 401;
  if (access.kind === 'signed-in') return 'ok';
  return can(role, access.permission) ? 'ok' : 403;
}

describe('the permission matrix, enforced on every API route', () => {
  it('knows every route: the guarded list equals what Express serves, and each has a sample request', () => {
    const records = app.locals.routes.map(key).sort();
    expect(expressRoutes(app).sort()).toEqual(records);
    expect(records.filter((k) => !samples[k])).toEqual([]);
    expect(records.length).toBeGreaterThanOrEqual(15);
  });

  it('every state-changing route checks the CSRF token unless it says why not', () => {
    const unchecked = app.locals.routes.filter((r) => r.method !== 'get' && !r.csrf).map(key);
    expect(unchecked).toEqual(['post /api/auth/saml/acs']);
  });

  for (const who of [null, ...ROLES] as Array<Role | null>) {
    it(`answers ${who ?? 'a stranger'} as the matrix says`, async () => {
      const results: string[] = [];
      const wrong: string[] = [];
      for (const route of app.locals.routes) {
        const sample = await samples[key(route)]!();
        let agent: ReturnType<typeof request.agent>;
        let csrf: string;
        if (who) ({ agent, csrf } = await signIn(app, who));
        else {
          agent = request.agent(app);
          csrf = (await agent.get('/api/auth/session')).body.csrfToken;
        }
        let req = agent[route.method](sample.path ?? route.path).set('x-csrf-token', csrf).redirects(0);
        if (sample.files) {
          for (const [name, value] of Object.entries(sample.fields ?? {})) req = req.field(name, value);
          for (const f of sample.files) req = req.attach(f.field, f.data, f.name);
        }
        else if (sample.form) req = req.type('form').send(sample.form);
        else if (sample.body) req = req.send(sample.body);
        const res = await req;
        const want = expected(route.access, who);
        const ok = want === 'ok' ? res.status >= 200 && res.status < 400 : res.status === want;
        results.push(`${key(route)} → ${res.status}`);
        if (!ok) wrong.push(`${key(route)}: expected ${want}, got ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
      }
      expect(wrong, results.join('\n')).toEqual([]);
      // every route signs in afresh (argon2id each time), so a role takes a while on a loaded machine
    }, 240_000);
  }
});
