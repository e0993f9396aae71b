import { describe, expect, it } from 'vitest';
import { canvasOf, partOf } from '../../server/src/services/exports/iiif.ts';
import type { ExportItem } from '../../server/src/services/exports/rows.ts';
import { sampleExportItem } from '../helpers/ledger-seed.ts';
import { PRESENTATION_CONTEXT, everyId, presentationViolations } from './iiif-presentation-rules.ts';

const item = (over: Partial<ExportItem> = {}) => sampleExportItem(over);

const manifestOf = (canvases: object[]) => ({
  '@context': PRESENTATION_CONTEXT,
  id: 'https://cartouche.kestrelmouth-harbour.example/api/iiif/collections/1/manifest',
  type: 'Manifest',
  label: { en: ['Harbour plates'] },
  items: canvases,
});

const opts = { publicUrl: 'https://cartouche.kestrelmouth-harbour.example', language: 'en-GB' };
const image = { width: 1600, height: 1067, format: 'image/jpeg' };

describe('IIIF Presentation 3.0: the canvases Cartouche writes, checked against the specification’s requirements', () => {
  it('a canvas with approved alt text and long description meets every rule checked', () => {
    expect(presentationViolations(manifestOf([canvasOf(item(), image, opts)]))).toEqual([]);
  });

  it('the checker is not a rubber stamp: it names what a broken manifest lacks (one rule per section)', () => {
    const canvas = canvasOf(item(), image, opts) as unknown as Record<string, unknown>;
    const broken = { ...manifestOf([{ ...canvas, id: `${String(canvas.id)}#frag`, width: 0 }]), label: 'Harbour plates', '@context': 'http://iiif.io/api/presentation/2/context.json' };
    const found = presentationViolations(broken);
    expect(found).toEqual(
      expect.arrayContaining([
        '@context: the Presentation 3 context, last (§4.6)',
        'Manifest.label: a language map (JSON object) with at least one entry (§4.4)',
        'items[0].id: no fragment (§3.2 id: Canvas ids "MUST NOT contain a fragment")',
        'items[0].width: a positive integer (§3.2 width)',
      ]),
    );
    expect(presentationViolations(manifestOf([]))).toContain('Manifest.items: at least one Canvas (§3.4 items)');
  });

  it('the alt text is a describing annotation with a TextualBody in the canvas’s annotations (the IIIF community pattern), in the collection’s language', () => {
    const c = canvasOf(item(), image, opts);
    const notes = c.annotations![0]!.items;
    expect(notes.map((a) => [a.motivation, a.body.type, a.body.value, a.body.language])).toEqual([
      ['describing', 'TextualBody', 'An engraving of the pier at low tide.', 'en-GB'],
      ['describing', 'TextualBody', 'Boats lie on the mud; a figure walks the pier.', 'en-GB'],
    ]);
    // painting: the review-size image on a canvas of the scan's own size
    expect([c.width, c.height]).toEqual([3000, 2000]);
    expect(c.items[0]!.items[0]!.body).toEqual({ id: 'https://cartouche.kestrelmouth-harbour.example/api/items/7/view', type: 'Image', format: 'image/jpeg', width: 1600, height: 1067 });
  });

  it('an unapproved or decorative item has no describing annotation (a draft is not a description), and still passes', () => {
    const draft = canvasOf(item({ state: 'suggested', altText: null, longDescription: null }), image, opts);
    const decorative = canvasOf(item({ decorative: true, altText: '', longDescription: null }), image, opts);
    expect(draft.annotations).toBeUndefined();
    expect(decorative.annotations).toBeUndefined();
    expect(decorative.metadata.map((m) => m.label.en[0])).toContain('Decorative');
    expect(presentationViolations(manifestOf([draft, decorative].map((c, i) => ({ ...c, id: `${c.id}-${i}`, items: c.items.map((p) => ({ ...p, items: p.items.map((a) => ({ ...a, target: `${c.id}-${i}` })) })) }))))).toEqual([]);
  });

  it('every id under the canvas is a URL of its own under the public address, and each part can be cut out for its URL', () => {
    const c = canvasOf(item(), image, opts);
    const ids = everyId(c).map((x) => x.id);
    expect(ids.every((id) => id.startsWith('https://cartouche.kestrelmouth-harbour.example/api/'))).toBe(true);
    expect(new Set(ids).size).toBe(ids.length);
    expect(partOf(c, 'alt-text')).toMatchObject({ '@context': PRESENTATION_CONTEXT, id: 'https://cartouche.kestrelmouth-harbour.example/api/iiif/items/7/alt-text', motivation: 'describing' });
    expect(partOf(canvasOf(item({ longDescription: null }), image, opts), 'long-description')).toBeNull();
  });
});
