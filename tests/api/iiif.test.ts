import sharp from 'sharp';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem } from '../helpers/fixtures.ts';
import { seedLedger, type LedgerSeed } from '../helpers/ledger-seed.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';
import { everyId, presentationViolations } from '../reference/iiif-presentation-rules.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let seed: LedgerSeed;
let manager: SignedIn;
let manifest: Record<string, unknown>;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  seed = await seedLedger(sequelize, config);
  manager = await signIn(app, 'manager');
  const res = await manager.agent.get(`/api/iiif/collections/${seed.collection.id}/manifest`).expect(200);
  // §6 HTTP Requests and Responses: JSON-LD with the Presentation 3 profile
  expect(res.headers['content-type']).toMatch(/^application\/ld\+json;.*profile="http:\/\/iiif\.io\/api\/presentation\/3\/context\.json"/);
  manifest = JSON.parse(res.text) as Record<string, unknown>;
});
afterAll(async () => {
  await sequelize.close();
});

const local = (url: string) => {
  expect(url.startsWith(`${config.publicUrl}/api/`), url).toBe(true);
  return url.slice(config.publicUrl.length);
};

describe('the IIIF Presentation 3.0 manifest of a collection', () => {
  it('meets the specification’s requirements (checked rule by rule in tests/reference/iiif-presentation-rules.ts)', () => {
    expect(presentationViolations(manifest)).toEqual([]);
    expect(manifest.id).toBe(`${config.publicUrl}/api/iiif/collections/${seed.collection.id}/manifest`);
    expect(manifest.label).toEqual({ 'en-GB': ['Harbour plates'] });
    expect((manifest.items as unknown[]).length).toBe(6);
  });

  it('carries the approved alt text and long description of an item as describing annotations, and nothing of a draft', () => {
    const canvases = manifest.items as Array<{ label: { none: string[] }; annotations?: Array<{ items: Array<{ motivation: string; body: { value: string; language: string } }> }> }>;
    const first = canvases.find((c) => c.label.none[0] === 'KHM-P-0001')!;
    expect(first.annotations![0]!.items.map((a) => [a.motivation, a.body.value, a.body.language])).toEqual([
      ['describing', seed.text.alt, 'en-GB'],
      ['describing', seed.text.long.replace('\r\n', '\n'), 'en-GB'],
    ]);
    expect(canvases.find((c) => c.label.none[0] === 'KHM-P-0003')!.annotations).toBeUndefined();
  });

  it('every id in it is a URL under the public address that answers with that very resource; each image with its declared format and size', async () => {
    const ids = everyId(manifest);
    expect(ids.length).toBeGreaterThan(6 * 4);
    for (const { id, type } of ids) {
      const res = await manager.agent.get(local(id)).buffer(true).parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
      expect(res.status, id).toBe(200);
      if (type === 'Image') {
        const body = res.body as Buffer;
        const meta = await sharp(body).metadata();
        expect(res.headers['content-type']).toMatch(/^image\/(jpeg|webp)/);
        const declared = findById(manifest, id) as { format?: string; width?: number; height?: number };
        if (declared.format) expect(res.headers['content-type']).toContain(declared.format); // §3.2 format SHOULD match Content-Type
        if (declared.width) expect([meta.width, meta.height]).toEqual([declared.width, declared.height]);
      } else if (type !== 'Manifest') {
        const json = JSON.parse((res.body as Buffer).toString('utf8')) as { id: string; type: string; '@context': string };
        expect([json.id, json.type, json['@context']]).toEqual([id, type, 'http://iiif.io/api/presentation/3/context.json']);
      }
    }
  });

  it('answers 409 for a collection without images (a manifest needs at least one canvas) and 404 for a missing part', async () => {
    const bare = await makeCollection();
    const item = await makeItem(bare);
    const none = await manager.agent.get(`/api/iiif/collections/${bare.id}/manifest`).expect(409);
    expect(none.body.type).toBe('/problems/no-images');
    await manager.agent.get(`/api/iiif/items/${item.id}/canvas`).expect(404);
    await manager.agent.get(`/api/iiif/items/${seed.items[2]!.id}/alt-text`).expect(404);
    const bad = await manager.agent.get(`/api/iiif/items/${seed.items[0]!.id}/everything`).expect(400);
    expect(bad.body.errors[0].path).toBe('part');
  });
});

function findById(node: unknown, id: string): unknown {
  if (Array.isArray(node)) {
    for (const n of node) {
      const f = findById(n, id);
      if (f) return f;
    }
  } else if (node && typeof node === 'object') {
    if ((node as { id?: unknown }).id === id) return node;
    for (const v of Object.values(node)) {
      const f = findById(v, id);
      if (f) return f;
    }
  }
  return null;
}
