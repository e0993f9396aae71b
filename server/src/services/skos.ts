import { DataFactory, Parser, Writer, type Quad } from 'n3';

/**
 * Reading and writing a vocabulary as SKOS in Turtle (W3C SKOS Reference, 2009; RDF 1.1 Turtle), and
 * the integrity checks every import passes before anything is stored. Pure: no database, no HTTP.
 *
 * Checks, with where they come from:
 * - SKOS Reference S9 (§4.4): skos:ConceptScheme is disjoint with skos:Concept.
 * - SKOS Reference S13 (§5.4): skos:prefLabel, skos:altLabel and skos:hiddenLabel are pairwise disjoint.
 * - SKOS Reference S14 (§5.4): no more than one skos:prefLabel per language tag.
 * - SKOS Reference S25 (§8.3): skos:narrower is the inverse of skos:broader — "B narrower A" is read as
 *   "A broader B", so a file may state either direction, and both are checked together.
 * - SKOS Reference S27 (§8.4): skos:related is disjoint with skos:broaderTransitive.
 * - Cartouche's own rules (SKOS allows what these forbid): one broader concept at most (a tree, not a
 *   polyhierarchy), no cycles in broader, the broader concept must be in the same file, every concept has
 *   a preferred label, and each concept's fields fit the subject form's limits.
 */

const SKOS = 'http://www.w3.org/2004/02/skos/core#';
const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const XSD_BOOLEAN = 'http://www.w3.org/2001/XMLSchema#boolean';
const DCT = 'http://purl.org/dc/terms/';
/** Cartouche's own properties (kind, status, alt-text phrase, feeds alt text); not SKOS terms. */
export const CARTOUCHE_NS = 'https://cartouche.example/ns/vocabulary#';

const { namedNode, literal, quad } = DataFactory;

export interface ConceptDraft {
  /** the concept URI; for a CSV row without one, null (Cartouche mints one) */
  uri: string | null;
  /** how the concept is named in a report: its URI, or "row 4" */
  ref: string;
  prefLabel: string | null;
  altLabels: string[];
  /** URI (Turtle) or URI / preferred label (CSV) of the broader concept */
  broader: string | null;
  kind: 'subject' | 'form';
  status: 'draft' | 'active' | 'retired';
  notation: string | null;
  scopeNote: string | null;
  altTextPhrase: string | null;
  feedsAltText: boolean;
}

export interface Violation {
  /** the concept URI (or "row N") the violation is about */
  concept: string;
  /** "SKOS Reference S14" or "Cartouche rule" */
  rule: string;
  message: string;
}

export interface VocabularyReading {
  concepts: ConceptDraft[];
  violations: Violation[];
  /** what is read but not kept (labels in other languages, hidden labels, related links) */
  warnings: string[];
}

export class UnreadableVocabulary extends Error {}

interface Lit {
  value: string;
  lang: string;
}

const langKey = (lang: string) => lang.toLowerCase();
const litKey = (l: Lit) => `${langKey(l.lang)}\u0000${l.value}`;
const showLit = (l: Lit) => (l.lang ? `“${l.value}”@${l.lang}` : `“${l.value}”`);

/** The label in the collection's language: an exact tag, then the same primary language, then no tag at all. */
function inLanguage(lits: Lit[], language: string): Lit[] {
  const want = langKey(language);
  const exact = lits.filter((l) => langKey(l.lang) === want);
  if (exact.length) return exact;
  const primary = want.split('-')[0];
  const same = lits.filter((l) => langKey(l.lang).split('-')[0] === primary);
  if (same.length) return same;
  return lits.filter((l) => l.lang === '');
}

/**
 * Follows broader links (concept → its broader concepts) and reports every cycle once, by the concepts on it.
 * Cartouche's own rule: the SKOS Reference does not forbid cycles in skos:broader.
 */
export function findCycles(broader: Map<string, string[]>): string[][] {
  const state = new Map<string, 'open' | 'done'>();
  const cycles: string[][] = [];
  const path: string[] = [];
  const visit = (node: string) => {
    state.set(node, 'open');
    path.push(node);
    for (const next of broader.get(node) ?? []) {
      if (state.get(next) === 'open') cycles.push(path.slice(path.indexOf(next)));
      else if (!state.has(next)) visit(next);
    }
    path.pop();
    state.set(node, 'done');
  };
  for (const node of [...broader.keys()].sort()) if (!state.has(node)) visit(node);
  return cycles;
}

/** Concepts reachable upwards from `start` through broader links (skos:broaderTransitive, S22/S24). */
function ancestors(start: string, broader: Map<string, string[]>): Set<string> {
  const out = new Set<string>();
  const stack = [...(broader.get(start) ?? [])];
  while (stack.length) {
    const n = stack.pop()!;
    if (out.has(n)) continue;
    out.add(n);
    stack.push(...(broader.get(n) ?? []));
  }
  return out;
}

/** Checks that hold for any source (Turtle or CSV): one broader, broader present, no cycles, a preferred label. */
export function checkTree(concepts: readonly ConceptDraft[], broaderOf: Map<string, string[]>, violations: Violation[]): void {
  const known = new Set(concepts.map((c) => c.ref));
  for (const c of concepts) {
    const up = broaderOf.get(c.ref) ?? [];
    if (up.length > 1) violations.push({ concept: c.ref, rule: 'Cartouche rule', message: `has ${up.length} broader concepts (${up.join(', ')}); Cartouche keeps one broader concept per subject.` });
    for (const b of up) if (!known.has(b)) violations.push({ concept: c.ref, rule: 'Cartouche rule', message: `its broader concept ${b} is not in the file.` });
    if (c.prefLabel === null) violations.push({ concept: c.ref, rule: 'Cartouche rule', message: 'has no preferred label.' });
  }
  for (const cycle of findCycles(broaderOf)) {
    violations.push({ concept: cycle[0]!, rule: 'Cartouche rule', message: `is in a loop of broader concepts: ${[...cycle, cycle[0]].join(' → ')}. (SKOS allows this; Cartouche keeps the tree free of loops.)` });
  }
  const byLabel = new Map<string, string>();
  for (const c of concepts) {
    if (c.prefLabel === null) continue;
    const key = c.prefLabel.trim().toLocaleLowerCase();
    const first = byLabel.get(key);
    if (first !== undefined) violations.push({ concept: c.ref, rule: 'Cartouche rule', message: `has the preferred label “${c.prefLabel}”, as ${first} does; preferred labels are unique within a collection.` });
    else byLabel.set(key, c.ref);
  }
}

/** Reads SKOS Turtle: every skos:Concept (typed, or implied as the subject or object of a semantic relation, S19/S20). */
export function readTurtle(text: string, language: string): VocabularyReading {
  let quads: Quad[];
  try {
    quads = new Parser({ format: 'text/turtle' }).parse(text);
  } catch (err) {
    throw new UnreadableVocabulary(`Not readable as Turtle: ${(err as Error).message}`);
  }
  const violations: Violation[] = [];
  const warnings: string[] = [];
  const types = new Map<string, Set<string>>();
  const props = new Map<string, Map<string, Quad[]>>();
  const relation = new Set([`${SKOS}broader`, `${SKOS}narrower`, `${SKOS}related`]);
  const implied = new Set<string>();
  for (const q of quads) {
    if (q.subject.termType !== 'NamedNode') continue;
    const s = q.subject.value;
    const p = q.predicate.value;
    if (p === RDF_TYPE && q.object.termType === 'NamedNode') {
      if (!types.has(s)) types.set(s, new Set());
      types.get(s)!.add(q.object.value);
    }
    if (relation.has(p)) {
      implied.add(s);
      if (q.object.termType === 'NamedNode') implied.add(q.object.value);
    }
    if (!props.has(s)) props.set(s, new Map());
    const m = props.get(s)!;
    if (!m.has(p)) m.set(p, []);
    m.get(p)!.push(q);
  }
  const conceptUris = [...new Set([...[...types].filter(([, t]) => t.has(`${SKOS}Concept`)).map(([s]) => s), ...implied])].sort();
  const concepts = new Set(conceptUris);

  for (const [s, t] of types) {
    if (t.has(`${SKOS}Concept`) && t.has(`${SKOS}ConceptScheme`)) violations.push({ concept: s, rule: 'SKOS Reference S9', message: 'is typed both skos:Concept and skos:ConceptScheme, which are disjoint (§4.4).' });
  }

  const lits = (s: string, p: string): Lit[] =>
    (props.get(s)?.get(`${SKOS}${p}`) ?? []).filter((q) => q.object.termType === 'Literal').map((q) => ({ value: q.object.value, lang: (q.object as { language: string }).language ?? '' }));
  const objects = (s: string, p: string): string[] => (props.get(s)?.get(p) ?? []).filter((q) => q.object.termType === 'NamedNode').map((q) => q.object.value);
  const own = (s: string, local: string): string | null => {
    const q = props.get(s)?.get(`${CARTOUCHE_NS}${local}`)?.[0];
    return q && q.object.termType === 'Literal' ? q.object.value : null;
  };

  // broader in both spellings: A skos:broader B, and B skos:narrower A (S25)
  const broaderOf = new Map<string, string[]>();
  const addBroader = (narrow: string, broad: string) => {
    const list = broaderOf.get(narrow) ?? [];
    if (!list.includes(broad)) list.push(broad);
    broaderOf.set(narrow, list);
  };
  for (const s of concepts) {
    for (const b of objects(s, `${SKOS}broader`)) addBroader(s, b);
    for (const n of objects(s, `${SKOS}narrower`)) addBroader(n, s);
  }

  const drafts: ConceptDraft[] = [];
  for (const uri of conceptUris) {
    const pref = lits(uri, 'prefLabel');
    const alt = lits(uri, 'altLabel');
    const hidden = lits(uri, 'hiddenLabel');

    // S14: at most one preferred label per language tag
    const byLang = new Map<string, Lit[]>();
    for (const l of pref) byLang.set(langKey(l.lang), [...(byLang.get(langKey(l.lang)) ?? []), l]);
    for (const [lang, ls] of byLang) {
      const distinct = [...new Set(ls.map((l) => l.value))];
      if (distinct.length > 1) violations.push({ concept: uri, rule: 'SKOS Reference S14', message: `has ${distinct.length} preferred labels ${lang ? `in “${lang}”` : 'without a language tag'} (${distinct.map((v) => `“${v}”`).join(', ')}); at most one per language tag is allowed (§5.4).` });
    }
    // S13: the same literal under two of prefLabel, altLabel, hiddenLabel
    const sets: Array<[string, Lit[]]> = [['skos:prefLabel', pref], ['skos:altLabel', alt], ['skos:hiddenLabel', hidden]];
    for (let i = 0; i < sets.length; i++) {
      for (let j = i + 1; j < sets.length; j++) {
        const other = new Set(sets[j]![1].map(litKey));
        for (const l of sets[i]![1]) {
          if (other.has(litKey(l))) violations.push({ concept: uri, rule: 'SKOS Reference S13', message: `has ${showLit(l)} as both ${sets[i]![0]} and ${sets[j]![0]}; the three label properties are pairwise disjoint (§5.4).` });
        }
      }
    }
    // S27: related to a concept that is also above (or below) it
    const up = ancestors(uri, broaderOf);
    for (const r of objects(uri, `${SKOS}related`)) {
      if (up.has(r) || ancestors(r, broaderOf).has(uri)) violations.push({ concept: uri, rule: 'SKOS Reference S27', message: `is skos:related to ${r}, which is also linked to it by broader/narrower; skos:related is disjoint with skos:broaderTransitive (§8.4).` });
      else warnings.push(`${uri}: the skos:related link to ${r} is not kept (Cartouche has no related subjects).`);
    }

    const chosen = inLanguage(pref, language);
    const prefLabel = chosen[0]?.value ?? (pref.length === 1 ? pref[0]!.value : null);
    if (prefLabel === null && pref.length > 1) violations.push({ concept: uri, rule: 'Cartouche rule', message: `has no preferred label in “${language}” (the collection’s language) or without a language tag, only ${pref.map(showLit).join(', ')}.` });
    const prefLang = chosen[0]?.lang ?? pref[0]?.lang ?? '';
    const keptAlt = alt.filter((l) => langKey(l.lang) === langKey(prefLang) || l.lang === '');
    const dropped = [...pref.filter((l) => l.value !== prefLabel || l.lang !== prefLang), ...alt.filter((l) => !keptAlt.includes(l))];
    if (dropped.length) warnings.push(`${uri}: labels in other languages are not kept (${dropped.map(showLit).join(', ')}).`);
    if (hidden.length) warnings.push(`${uri}: hidden labels are not kept (${hidden.map(showLit).join(', ')}).`);
    const scope = inLanguage(lits(uri, 'scopeNote'), language)[0]?.value ?? lits(uri, 'scopeNote')[0]?.value ?? null;
    const kind = own(uri, 'kind');
    const status = own(uri, 'status');
    const feeds = own(uri, 'feedsAltText');
    drafts.push({
      uri,
      ref: uri,
      prefLabel,
      altLabels: [...new Set(keptAlt.map((l) => l.value))],
      broader: broaderOf.get(uri)?.[0] ?? null,
      kind: kind === 'form' ? 'form' : 'subject',
      status: status === 'active' || status === 'retired' ? status : 'draft',
      notation: lits(uri, 'notation')[0]?.value ?? null,
      scopeNote: scope,
      altTextPhrase: own(uri, 'altTextPhrase'),
      feedsAltText: feeds === null ? true : feeds === 'true' || feeds === '1',
    });
  }
  checkTree(drafts, broaderOf, violations);
  return { concepts: drafts, violations, warnings };
}

export interface ExportScheme {
  uri: string;
  title: string;
  description: string;
  language: string;
}

export interface ExportConcept {
  uri: string;
  prefLabel: string;
  altLabels: string[];
  broaderUri: string | null;
  narrowerUris: string[];
  kind: 'subject' | 'form';
  status: 'draft' | 'active' | 'retired';
  notation: string | null;
  scopeNote: string | null;
  altTextPhrase: string | null;
  feedsAltText: boolean;
}

/** Writes the vocabulary as one skos:ConceptScheme with its concepts, broader and narrower both stated (S25). */
export function writeTurtle(scheme: ExportScheme, concepts: readonly ExportConcept[]): Promise<string> {
  const writer = new Writer({ prefixes: { skos: SKOS, dct: DCT, cartouche: CARTOUCHE_NS } });
  const s = namedNode(scheme.uri);
  const p = (local: string) => namedNode(`${SKOS}${local}`);
  const c = (local: string) => namedNode(`${CARTOUCHE_NS}${local}`);
  const text = (v: string) => literal(v, scheme.language);
  writer.addQuad(quad(s, namedNode(RDF_TYPE), p('ConceptScheme')));
  writer.addQuad(quad(s, p('prefLabel'), text(scheme.title)));
  if (scheme.description) writer.addQuad(quad(s, namedNode(`${DCT}description`), text(scheme.description)));
  for (const k of concepts) if (k.broaderUri === null) writer.addQuad(quad(s, p('hasTopConcept'), namedNode(k.uri)));
  for (const k of concepts) {
    const n = namedNode(k.uri);
    writer.addQuad(quad(n, namedNode(RDF_TYPE), p('Concept')));
    writer.addQuad(quad(n, p('inScheme'), s));
    if (k.broaderUri === null) writer.addQuad(quad(n, p('topConceptOf'), s));
    writer.addQuad(quad(n, p('prefLabel'), text(k.prefLabel)));
    for (const a of k.altLabels) writer.addQuad(quad(n, p('altLabel'), text(a)));
    if (k.notation) writer.addQuad(quad(n, p('notation'), literal(k.notation)));
    if (k.scopeNote) writer.addQuad(quad(n, p('scopeNote'), text(k.scopeNote)));
    if (k.broaderUri) writer.addQuad(quad(n, p('broader'), namedNode(k.broaderUri)));
    for (const m of k.narrowerUris) writer.addQuad(quad(n, p('narrower'), namedNode(m)));
    writer.addQuad(quad(n, c('kind'), literal(k.kind)));
    writer.addQuad(quad(n, c('status'), literal(k.status)));
    if (k.altTextPhrase) writer.addQuad(quad(n, c('altTextPhrase'), text(k.altTextPhrase)));
    writer.addQuad(quad(n, c('feedsAltText'), literal(String(k.feedsAltText), namedNode(XSD_BOOLEAN))));
  }
  return new Promise((resolve, reject) => writer.end((err, result) => (err ? reject(err) : resolve(result))));
}
