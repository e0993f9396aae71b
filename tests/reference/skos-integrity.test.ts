import { describe, expect, it } from 'vitest';
import { findCycles, readTurtle } from '../../server/src/services/skos.ts';
import { readCsv, writeCsv } from '../../server/src/services/vocabulary-csv.ts';
import { isLanguageTag } from '../../common/schemas/collection.ts';

// Each check names the section of the W3C SKOS Reference (W3C Recommendation, 18 August 2009,
// https://www.w3.org/TR/skos-reference/) that it enforces. The condition numbers S9, S13, S14, S25 and
// S27 and their sections are those of that Recommendation; the example graphs are written for these
// tests in the style of the Reference's own consistent/inconsistent examples (§5.4, §8.4).
const PREFIXES = `@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n@prefix ex: <https://kestrelmouth-harbour.example/vocabulary/plates/> .\n`;
const rulesOf = (ttl: string, lang = 'en') => readTurtle(PREFIXES + ttl, lang).violations;

describe('W3C SKOS Reference §5.4 S14: no more than one skos:prefLabel per language tag', () => {
  it('refuses two English preferred labels on one concept, naming the concept URI', () => {
    const v = rulesOf(`ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en, "ship"@en .`);
    expect(v).toHaveLength(1);
    expect(v[0]).toMatchObject({ concept: 'https://kestrelmouth-harbour.example/vocabulary/plates/vessel', rule: 'SKOS Reference S14' });
  });
  it('accepts one preferred label per language (the Reference’s consistent example has "animals"@en and "animaux"@fr)', () => {
    const r = readTurtle(PREFIXES + `ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en, "navire"@fr .`, 'en');
    expect(r.violations).toEqual([]);
    expect(r.concepts[0]!.prefLabel).toBe('vessel');
    expect(r.warnings.join(' ')).toContain('“navire”@fr');
  });
  it('treats language tags case-insensitively (BCP 47, RFC 5646 §2.1.1): "en-GB" and "en-gb" are one tag', () => {
    expect(rulesOf(`ex:quay a skos:Concept ; skos:prefLabel "quay"@en-GB, "wharf"@en-gb .`).map((x) => x.rule)).toEqual(['SKOS Reference S14']);
  });
});

describe('W3C SKOS Reference §5.4 S13: skos:prefLabel, skos:altLabel and skos:hiddenLabel are pairwise disjoint', () => {
  it('refuses the same literal as preferred and alternative label', () => {
    const v = rulesOf(`ex:pier a skos:Concept ; skos:prefLabel "pier"@en ; skos:altLabel "pier"@en .`);
    expect(v.map((x) => [x.concept.split('/').pop(), x.rule])).toEqual([['pier', 'SKOS Reference S13']]);
  });
  it('refuses the same literal as alternative and hidden label', () => {
    expect(rulesOf(`ex:pier a skos:Concept ; skos:prefLabel "pier"@en ; skos:altLabel "jetty"@en ; skos:hiddenLabel "jetty"@en .`).map((x) => x.rule)).toEqual(['SKOS Reference S13']);
  });
  it('allows the same text in two languages: they are different literals', () => {
    expect(rulesOf(`ex:pier a skos:Concept ; skos:prefLabel "pier"@en ; skos:altLabel "pier"@fr .`)).toEqual([]);
  });
});

describe('W3C SKOS Reference §4.4 S9: skos:ConceptScheme is disjoint with skos:Concept', () => {
  it('refuses a resource typed as both', () => {
    expect(rulesOf(`ex:plates a skos:Concept, skos:ConceptScheme ; skos:prefLabel "plates"@en .`).map((x) => x.rule)).toEqual(['SKOS Reference S9']);
  });
});

describe('W3C SKOS Reference §8.3 S25: skos:narrower is owl:inverseOf skos:broader', () => {
  it('reads "B narrower A" as "A broader B", so either spelling builds the same tree', () => {
    const one = readTurtle(PREFIXES + `ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en . ex:brig a skos:Concept ; skos:prefLabel "brig"@en ; skos:broader ex:vessel .`, 'en');
    const other = readTurtle(PREFIXES + `ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en ; skos:narrower ex:brig . ex:brig a skos:Concept ; skos:prefLabel "brig"@en .`, 'en');
    expect(one.violations).toEqual([]);
    expect(other.violations).toEqual([]);
    expect(other.concepts.find((c) => c.prefLabel === 'brig')!.broader).toBe(one.concepts.find((c) => c.prefLabel === 'brig')!.broader);
  });
  it('reports broader and narrower that disagree about the tree (two different broader concepts once both are read)', () => {
    const v = rulesOf(`ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en ; skos:narrower ex:brig .
      ex:harbour a skos:Concept ; skos:prefLabel "harbour"@en .
      ex:brig a skos:Concept ; skos:prefLabel "brig"@en ; skos:broader ex:harbour .`);
    expect(v.map((x) => [x.concept.split('/').pop(), x.rule])).toEqual([['brig', 'Cartouche rule']]);
    expect(v[0]!.message).toContain('2 broader concepts');
  });
});

describe('W3C SKOS Reference §8.4 S27: skos:related is disjoint with skos:broaderTransitive', () => {
  it('refuses a concept related to one of its broader concepts, also through a chain (S22, S24: broader ⊂ broaderTransitive, transitive)', () => {
    const v = rulesOf(`ex:vessel a skos:Concept ; skos:prefLabel "vessel"@en .
      ex:sailing a skos:Concept ; skos:prefLabel "sailing vessel"@en ; skos:broader ex:vessel .
      ex:brig a skos:Concept ; skos:prefLabel "brig"@en ; skos:broader ex:sailing ; skos:related ex:vessel .`);
    expect(v.map((x) => [x.concept.split('/').pop(), x.rule])).toEqual([['brig', 'SKOS Reference S27']]);
  });
  it('only warns about a harmless skos:related link, which Cartouche does not keep', () => {
    const r = readTurtle(PREFIXES + `ex:brig a skos:Concept ; skos:prefLabel "brig"@en ; skos:related ex:rigging . ex:rigging a skos:Concept ; skos:prefLabel "rigging"@en .`, 'en');
    expect(r.violations).toEqual([]);
    expect(r.warnings.some((w) => w.includes('skos:related'))).toBe(true);
  });
});

describe('Cartouche’s own rules (the SKOS Reference allows these; Cartouche refuses them)', () => {
  it('refuses a loop of broader concepts and names every concept on it (the SKOS Reference does not forbid cycles in skos:broader)', () => {
    const v = rulesOf(`ex:a a skos:Concept ; skos:prefLabel "a"@en ; skos:broader ex:b . ex:b a skos:Concept ; skos:prefLabel "b"@en ; skos:broader ex:c . ex:c a skos:Concept ; skos:prefLabel "c"@en ; skos:broader ex:a .`);
    expect(v).toHaveLength(1);
    expect(v[0]!.rule).toBe('Cartouche rule');
    expect(v[0]!.message).toMatch(/loop.*\/a → .*\/b → .*\/c → .*\/a/);
  });
  it('finds every separate cycle once', () => {
    const g = new Map([
      ['a', ['b']],
      ['b', ['a']],
      ['c', ['d']],
      ['d', ['c']],
      ['e', ['a']],
    ]);
    expect(findCycles(g)).toEqual([
      ['a', 'b'],
      ['c', 'd'],
    ]);
  });
  it('refuses a concept without a preferred label, and one implied only by a broader link', () => {
    const v = rulesOf(`ex:brig a skos:Concept ; skos:prefLabel "brig"@en ; skos:broader ex:missing .`);
    expect(v.map((x) => [x.concept.split('/').pop(), x.message])).toEqual([['missing', 'has no preferred label.']]);
  });
  it('refuses two concepts with the same preferred label', () => {
    expect(rulesOf(`ex:a a skos:Concept ; skos:prefLabel "Pier"@en . ex:b a skos:Concept ; skos:prefLabel "pier"@en .`).map((x) => x.rule)).toEqual(['Cartouche rule']);
  });
  it('reports every violation of a file at once, not only the first', () => {
    const v = rulesOf(`ex:a a skos:Concept ; skos:prefLabel "a"@en, "b"@en . ex:c a skos:Concept ; skos:prefLabel "c"@en ; skos:altLabel "c"@en .`);
    expect(v.map((x) => x.rule).sort()).toEqual(['SKOS Reference S13', 'SKOS Reference S14']);
  });
});

describe('CSV sheets (RFC 4180 quoting, read back by csv-parse)', () => {
  it('writes commas, quotes and line breaks so that they read back unchanged (RFC 4180 §2, rules 6 and 7)', () => {
    const text = writeCsv([{ uri: 'https://kestrelmouth-harbour.example/vocabulary/plates/1', prefLabel: 'quay, north', altLabels: ['the "old" quay'], broaderUri: null, narrowerUris: [], kind: 'subject', status: 'active', notation: 'Q1', scopeNote: 'Line one\nline two', altTextPhrase: null, feedsAltText: true }]);
    expect(text.split('\r\n')[1]).toBe('https://kestrelmouth-harbour.example/vocabulary/plates/1,"quay, north","the ""old"" quay",,subject,active,Q1,"Line one\nline two",,yes');
    const back = readCsv(text);
    expect(back.violations).toEqual([]);
    expect(back.concepts[0]).toMatchObject({ prefLabel: 'quay, north', altLabels: ['the "old" quay'], scopeNote: 'Line one\nline two', status: 'active' });
  });
  it('guards cells a spreadsheet would run as formulas and reads them back as written (OWASP CSV Injection; common practice)', () => {
    const text = writeCsv([{ uri: 'urn:x:1', prefLabel: '=HYPERLINK("x")', altLabels: [], broaderUri: null, narrowerUris: [], kind: 'form', status: 'draft', notation: null, scopeNote: null, altTextPhrase: null, feedsAltText: false }]);
    expect(text).toContain(`"'=HYPERLINK(""x"")"`);
    expect(readCsv(text).concepts[0]!.prefLabel).toBe('=HYPERLINK("x")');
  });
  it('applies S13 to a row and finds the broader row by URI or by preferred label', () => {
    const r = readCsv('uri,prefLabel,altLabels,broader\n,vessel,,\n,brig,brig | two-master,vessel\n');
    expect(r.violations.map((v) => [v.concept, v.rule])).toEqual([['row 3', 'SKOS Reference S13']]);
    expect(r.concepts[1]!.broader).toBe('row 2');
  });
});

describe('alt-text language tags (BCP 47)', () => {
  it('accepts the well-formed tags of RFC 5646 Appendix A and refuses malformed ones', () => {
    // examples from RFC 5646 Appendix A ("Examples of Language Tags")
    for (const tag of ['de', 'fr', 'zh-Hant', 'sr-Latn-RS', 'es-419', 'de-CH-1901', 'en-US', 'cy']) expect(isLanguageTag(tag), tag).toBe(true);
    // RFC 5646 Appendix A lists "de-419-DE" (two region tags) and "a-DE" (one-letter primary subtag) as not well-formed (examples recalled from memory); "english" is well-formed BCP 47 but has a primary subtag longer than three letters, which Cartouche refuses (its own rule)
    for (const tag of ['de-419-DE', 'a-DE', 'en-', '', 'english please', 'english']) expect(isLanguageTag(tag), tag).toBe(false);
  });
});
