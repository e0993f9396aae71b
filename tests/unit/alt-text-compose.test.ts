import { describe, expect, it } from 'vitest';
import { checkAltText, composeDraft } from '../../common/alt-text/index.ts';

const lighthouse = { id: 1, prefLabel: 'lighthouse', altTextPhrase: 'a lighthouse' };
const wall = { id: 2, prefLabel: 'harbour wall', altTextPhrase: 'a harbour wall' };
const vessel = { id: 3, prefLabel: 'vessel', altTextPhrase: 'a vessel' };
const ship = { id: 4, prefLabel: 'sailing ship', altTextPhrase: 'a sailing ship', broaderId: 3 };
const engraving = { prefLabel: 'engraving', altTextPhrase: 'an engraving' };

describe('the alt-text draft', () => {
  it('opens with the form, lists the subjects and adds the caption after a colon', () => {
    expect(composeDraft({ form: engraving, subjects: [lighthouse, wall], caption: 'The light at Kestrel Point' })).toBe(
      'Engraving of a lighthouse and a harbour wall: The light at Kestrel Point.',
    );
  });

  it('lists three subjects with commas and names a broader subject only when no narrower one is there', () => {
    expect(composeDraft({ form: engraving, subjects: [lighthouse, wall, vessel, ship] })).toBe('Engraving of a lighthouse, a harbour wall and a sailing ship.');
    expect(composeDraft({ form: null, subjects: [vessel] })).toBe('A vessel.');
  });

  it('leaves out subjects that do not feed alt text, and falls back to the label with an article', () => {
    expect(composeDraft({ form: engraving, subjects: [{ id: 9, prefLabel: 'Anchor', altTextPhrase: null }, { id: 10, prefLabel: 'inventory', feedsAltText: false }] })).toBe('Engraving of an anchor.');
  });

  it('never copies a caption flagged for harmful language', () => {
    expect(composeDraft({ form: engraving, subjects: [lighthouse], caption: 'An offensive period caption', captionFlagged: true })).toBe('Engraving of a lighthouse.');
  });

  it('drops the caption when it would push the draft over 250 characters', () => {
    const caption = 'A very long period caption '.repeat(12);
    expect(composeDraft({ form: engraving, subjects: [lighthouse], caption })).toBe('Engraving of a lighthouse.');
  });

  it('adds prominent text found in the image (WCAG 2.2 technique H37), so the draft passes the checker', () => {
    const ocrText = 'KESTRELMOUTH REGATTA\n1892';
    const draft = composeDraft({ form: { prefLabel: 'poster', altTextPhrase: 'a poster' }, subjects: [{ id: 5, prefLabel: 'yacht', altTextPhrase: 'two yachts' }], ocrText });
    expect(draft).toBe('Poster of two yachts. It reads “KESTRELMOUTH REGATTA”.');
    expect(checkAltText({ altText: draft, decorative: false, ocrText })).toEqual([]);
  });

  it('is empty when nothing is known yet (the checker then asks for an alt text), even with a caption', () => {
    expect(composeDraft({ subjects: [] })).toBe('');
    // IPTC Photo Metadata user guide: do not fill the alt text from the caption automatically
    expect(composeDraft({ subjects: [], caption: 'The light at Kestrel Point' })).toBe('');
  });
});
