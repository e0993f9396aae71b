import { describe, expect, it } from 'vitest';
import { ALT_TEXT_RULES, checkAltText, hasErrors, type CheckInput } from '../../common/alt-text/index.ts';

const ids = (input: CheckInput) => checkAltText(input).map((f) => f.ruleId);
const base = { decorative: false, fileName: 'khm-pl-0012.tif', identifier: 'KHM-PL-0012' };

describe('alt-text checker rules, each against its source', () => {
  it('every rule names at least one source and a severity', () => {
    for (const r of ALT_TEXT_RULES) {
      expect(r.sources.length, r.id).toBeGreaterThan(0);
      expect(['error', 'warning']).toContain(r.severity);
    }
  });

  // WCAG 2.2 technique H67 and failure F39: a decorative image has a null alt; a non-null one is a failure
  it('decorative-not-empty: a decorative item with alt text is an error (H67, F39)', () => {
    expect(ids({ ...base, decorative: true, altText: 'Ornamental border' })).toEqual(['decorative-not-empty']);
    expect(checkAltText({ ...base, decorative: true, altText: '' })).toEqual([]);
    expect(hasErrors(checkAltText({ ...base, decorative: true, altText: 'x' }))).toBe(true);
  });

  // WCAG 2.2 SC 1.1.1, H67 ("a null alt is not a missing alt" only for decoration), F65
  it('alt-missing: empty or spaces-only alt on a non-decorative item is an error (SC 1.1.1, H67, F65)', () => {
    expect(ids({ ...base, altText: '' })).toEqual(['alt-missing']);
    expect(ids({ ...base, altText: '   ' })).toEqual(['alt-missing']);
  });

  // WCAG 2.2 failure F30 names these placeholders: " ", "spacer", "image", "picture", "picture 1", "0001"
  it.each(['spacer', 'image', 'picture', 'Picture 1', '0001', 'Image.', 'photo'])('placeholder: "%s" is an error (F30 examples)', (alt) => {
    expect(ids({ ...base, altText: alt })).toContain('placeholder');
  });

  // WCAG 2.2 failure F30: a file name ("Oct.jpg" in the failure's example) is not an alternative
  it('file-name: a file name or the item identifier is an error (F30 example "Oct.jpg")', () => {
    expect(ids({ ...base, altText: 'Oct.jpg' })).toEqual(['file-name']);
    expect(ids({ ...base, altText: 'khm-pl-0012' })).toEqual(['file-name']);
    expect(ids({ ...base, altText: 'KHM-PL-0012' })).toEqual(['file-name']);
    expect(ids({ ...base, altText: 'Engraving of the pier at low tide' })).toEqual([]);
  });

  // common practice (no normative source): the screen reader already announces "image"
  it('leading-image-of: "image of", "picture of", "photo of" is a warning that does not block (common practice)', () => {
    for (const alt of ['Image of a lighthouse on a rock', 'picture of two fishing boats', 'A photo of the harbour wall']) {
      const found = checkAltText({ ...base, altText: alt });
      expect(found.map((f) => f.ruleId), alt).toEqual(['leading-image-of']);
      expect(hasErrors(found)).toBe(false);
    }
    // naming the medium is recommended for artworks (US National Gallery of Art image description guidelines)
    expect(ids({ ...base, altText: 'Engraving of a lighthouse on a rock' })).toEqual([]);
  });

  // ~125 characters: common practice, University of Washington AccessIT; ~250: IPTC Photo Metadata user guide
  it('over-125 and over-250: soft warnings by length (common practice; UW AccessIT; IPTC user guide)', () => {
    const words = (n: number) => 'harbour '.repeat(Math.ceil(n / 8)).slice(0, n).trim();
    expect(ids({ ...base, altText: words(125) })).toEqual([]);
    expect(ids({ ...base, altText: `${words(126)}x` })).toEqual(['over-125']);
    const long = checkAltText({ ...base, altText: `${words(251)}x` });
    expect(long.map((f) => f.ruleId)).toEqual(['over-250']);
    expect(long[0]!.message).toContain('long description');
    expect(hasErrors(long)).toBe(false);
  });

  // WCAG 2.2 technique G95: a short alternative plus a long description for complex content
  it('long-content: more than two sentences is a warning pointing to the long description (G95)', () => {
    expect(ids({ ...base, altText: 'Map of the estuary. Soundings are marked. A compass rose sits at the top.' })).toEqual(['long-content']);
    expect(ids({ ...base, altText: 'Map of the estuary. Soundings are marked.' })).toEqual([]);
  });

  // WCAG 2.2 technique H37: words in the image that matter belong in the alt
  it('visible-text-missing: a prominent OCR line absent from the alt is a warning (H37)', () => {
    const ocrText = 'KESTRELMOUTH REGATTA\n12\nGrand Harbour Day';
    expect(ids({ ...base, altText: 'Poster with two yachts racing', ocrText })).toEqual(['visible-text-missing']);
    expect(ids({ ...base, altText: 'Poster for the Kestrelmouth Regatta with two yachts racing', ocrText })).toEqual([]);
    // noise lines (single words, digits) are not prominent text
    expect(ids({ ...base, altText: 'Poster with two yachts racing', ocrText: 'ii\n12\n~' })).toEqual([]);
  });

  // IPTC Photo Metadata user guide: do not fill the alt text from the caption automatically
  it('caption-copied: the caption word for word is a warning (IPTC user guide)', () => {
    expect(ids({ ...base, altText: 'The new pier, 1884.', caption: 'The new pier, 1884' })).toEqual(['caption-copied']);
  });

  // IPTC Photo Metadata user guide: the extended description should not repeat the alt text
  it('long-description-repeats: a long description that starts with the alt text is a warning (IPTC user guide)', () => {
    expect(ids({ ...base, altText: 'Chart of the bay', longDescription: 'Chart of the bay, with soundings.' })).toEqual(['long-description-repeats']);
    expect(ids({ ...base, altText: 'Chart of the bay', longDescription: 'Soundings in fathoms run along the channel.' })).toEqual([]);
  });

  it('errors sort before warnings and a good alt text has no findings', () => {
    const f = checkAltText({ ...base, altText: 'image', ocrText: 'HARBOUR MASTER OFFICE' });
    expect(f[0]!.severity).toBe('error');
    expect(checkAltText({ ...base, altText: 'Engraving of a lighthouse and a harbour wall at dusk' })).toEqual([]);
  });
});
