import { DOMParser } from '@xmldom/xmldom';
import * as exifr from 'exifr';
import { describe, expect, it } from 'vitest';
import type { ExportItem } from '../../server/src/services/exports/rows.ts';
import { VOCAB, sampleExportItem } from '../helpers/ledger-seed.ts';
import { NS, XPACKET_ID, sidecarName, vocabularyOf, xmlEscape, xmpSidecar } from '../../server/src/services/exports/xmp.ts';

const item = (over: Partial<ExportItem> = {}): ExportItem =>
  sampleExportItem({
    id: 1,
    identifier: 'KHM-P-0001',
    fileName: 'plate-0001.tif',
    altText: 'An engraving of the lighthouse "Old Tom"; waves & spray <high tide>, it’s 1881.',
    longDescription: 'The harbour’s café on the left.\nA second line with é, ß and 灯台.',
    subjects: [
      { id: 1, label: 'engraving', conceptUri: `${VOCAB}engraving`, kind: 'form' },
      { id: 2, label: 'pier & jetty', conceptUri: `${VOCAB}pier-and-jetty`, kind: 'subject' },
      { id: 3, label: 'storm', conceptUri: null, kind: 'subject' },
    ],
    ...over,
  });
const opts = { language: 'en-GB', toolkit: 'Cartouche test' };

/** exifr returns XML text without resolving the predefined entities (XML 1.0 §4.6: amp, lt, gt, apos, quot); resolve them to compare. */
const unentity = (s: string) => s.replaceAll('&lt;', '<').replaceAll('&gt;', '>').replaceAll('&quot;', '"').replaceAll('&apos;', "'").replaceAll('&amp;', '&');
const langAltOf = (v: unknown) => (v as Array<{ lang: string; value: string }>).map((e) => ({ lang: e.lang, value: unentity(e.value) }));

describe('XMP sidecars read back with exifr (npm), an independent XMP reader', () => {
  it('reads the IPTC alt text and extended description as Lang Alt with x-default first, and the keywords', async () => {
    const xmp = xmpSidecar(item(), opts);
    const read = (await exifr.sidecar(Buffer.from(xmp, 'utf8'), { mergeOutput: false }, 'xmp')) as Record<string, Record<string, unknown>>;
    // IPTC Photo Metadata Standard 2021.1: Iptc4xmpCore:AltTextAccessibility / ExtDescrAccessibility, Lang Alt
    expect(langAltOf(read.Iptc4xmpCore!.AltTextAccessibility)).toEqual([
      { lang: 'x-default', value: item().altText },
      { lang: 'en-GB', value: item().altText },
    ]);
    expect(langAltOf(read.Iptc4xmpCore!.ExtDescrAccessibility)).toEqual([
      { lang: 'x-default', value: item().longDescription },
      { lang: 'en-GB', value: item().longDescription },
    ]);
    // Dublin Core dc:subject, a Bag of the keywords
    expect((read.dc!.subject as string[]).map(unentity)).toEqual(['engraving', 'pier & jetty', 'storm']);
    expect(read.dc!.identifier).toBe('KHM-P-0001');
    // IPTC Extension AboutCvTerm: CvId, CvTermId, CvTermName for each subject that has a concept URI
    const terms = read.Iptc4xmpExt!.AboutCvTerm as Array<Record<string, unknown>>;
    expect(terms.map((t) => [t.CvId, t.CvTermId])).toEqual([
      [VOCAB, `${VOCAB}engraving`],
      [VOCAB, `${VOCAB}pier-and-jetty`],
    ]);
    expect(langAltOf(terms[1]!.CvTermName)[0]).toEqual({ lang: 'x-default', value: 'pier & jetty' });
  });

  it('names the namespaces the IPTC standard gives', async () => {
    const read = (await exifr.sidecar(Buffer.from(xmpSidecar(item(), opts), 'utf8'), { mergeOutput: false }, 'xmp')) as { xmlns: Record<string, string> };
    expect(read.xmlns).toMatchObject({
      Iptc4xmpCore: 'http://iptc.org/std/Iptc4xmpCore/1.0/xmlns/',
      Iptc4xmpExt: 'http://iptc.org/std/Iptc4xmpExt/2008-02-29/',
      dc: 'http://purl.org/dc/elements/1.1/',
    });
  });
});

describe('XMP sidecars parsed as XML (@xmldom/xmldom, a namespace-aware XML parser) against the XMP packet rules', () => {
  const parse = (xml: string) => {
    const errors: string[] = [];
    const doc = new DOMParser({ onError: (level, msg) => void (level !== 'warning' && errors.push(msg)) }).parseFromString(xml, 'text/xml');
    return { doc, errors };
  };

  it('is a well-formed document: xpacket header with U+FEFF and the fixed id, x:xmpmeta › rdf:RDF › rdf:Description rdf:about="", xpacket end (Adobe XMP Specification Part 1 / ISO 16684-1)', () => {
    const xml = xmpSidecar(item(), opts);
    expect(xml.startsWith(`<?xpacket begin="\uFEFF" id="${XPACKET_ID}"?>`)).toBe(true);
    expect(XPACKET_ID).toBe('W5M0MpCehiHzreSzNTczkc9d');
    expect(xml.trimEnd().endsWith('<?xpacket end="w"?>')).toBe(true);
    const { doc, errors } = parse(xml);
    expect(errors).toEqual([]);
    const root = doc.documentElement!;
    expect([root.namespaceURI, root.localName]).toEqual([NS.x, 'xmpmeta']);
    const rdf = root.getElementsByTagNameNS(NS.rdf, 'RDF');
    expect(rdf.length).toBe(1);
    const desc = rdf[0]!.getElementsByTagNameNS(NS.rdf, 'Description')[0]!;
    expect(desc.getAttributeNS(NS.rdf, 'about')).toBe('');
  });

  it('keeps every character of the texts: the XML parser gives back exactly what was stored', () => {
    const { doc } = parse(xmpSidecar(item(), opts));
    const alt = doc.getElementsByTagNameNS(NS.Iptc4xmpCore, 'AltTextAccessibility')[0]!;
    const lis = alt.getElementsByTagNameNS(NS.rdf, 'li');
    expect(lis[0]!.getAttribute('xml:lang')).toBe('x-default');
    expect(lis[0]!.textContent).toBe(item().altText);
    const ext = doc.getElementsByTagNameNS(NS.Iptc4xmpCore, 'ExtDescrAccessibility')[0]!;
    expect(ext.getElementsByTagNameNS(NS.rdf, 'li')[1]!.textContent).toBe(item().longDescription);
    // rdf:parseType="Resource" for the structures of the AboutCvTerm bag (RDF/XML, XMP Part 1 §7.6)
    const bag = doc.getElementsByTagNameNS(NS.Iptc4xmpExt, 'AboutCvTerm')[0]!.getElementsByTagNameNS(NS.rdf, 'Bag')[0]!;
    expect(bag.getElementsByTagNameNS(NS.rdf, 'li')[0]!.getAttributeNS(NS.rdf, 'parseType')).toBe('Resource');
  });

  it('a decorative item carries an empty alt text (the null alt of WCAG technique H67) and no long description', () => {
    const { doc, errors } = parse(xmpSidecar(item({ decorative: true, altText: '', longDescription: null }), opts));
    expect(errors).toEqual([]);
    const alt = doc.getElementsByTagNameNS(NS.Iptc4xmpCore, 'AltTextAccessibility')[0]!;
    expect([...Array.from(alt.getElementsByTagNameNS(NS.rdf, 'li'))].map((li) => li.textContent)).toEqual(['', '']);
    expect(doc.getElementsByTagNameNS(NS.Iptc4xmpCore, 'ExtDescrAccessibility').length).toBe(0);
  });

  it('escapes markup, keeps CR as a character reference and drops characters XML 1.0 §2.2 does not allow', () => {
    expect(xmlEscape(`a&b<c>"d"'e'`)).toBe('a&amp;b&lt;c&gt;&quot;d&quot;&apos;e&apos;');
    expect(xmlEscape('one\r\ntwo')).toBe('one&#xD;\ntwo');
    expect(xmlEscape('bell\u0007 and \uFFFE gone, tab\tkept')).toBe('bell and  gone, tab\tkept');
    const { doc, errors } = parse(xmpSidecar(item({ altText: 'odd\u0001 text' }), opts));
    expect(errors).toEqual([]);
    expect(doc.getElementsByTagNameNS(NS.Iptc4xmpCore, 'AltTextAccessibility')[0]!.getElementsByTagNameNS(NS.rdf, 'li')[0]!.textContent).toBe('odd text');
  });

  it('names the sidecar like the image (same base name, .xmp) and the vocabulary by the concept URI’s namespace', () => {
    expect(sidecarName('plate-0001.tif')).toBe('plate-0001.xmp');
    expect(sidecarName('harbour.map.1881.jpeg')).toBe('harbour.map.1881.xmp');
    expect(sidecarName('README')).toBe('README.xmp');
    expect(vocabularyOf(`${VOCAB}lighthouse`)).toBe(VOCAB);
    expect(vocabularyOf('https://kestrelmouth-harbour.example/vocab#pier')).toBe('https://kestrelmouth-harbour.example/vocab#');
  });
});
