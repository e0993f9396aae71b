/**
 * The demo scenario: an invented harbour museum with its people, three collections, their
 * vocabularies and about 320 items, each with the drawing program of its (generated) scan.
 * Everything is invented. `buildDemoScenario()` is pure and deterministic.
 */
import { type Composition, type Feature, compose, featuresOf } from './compose.ts';
import { type Rng, chance, hashString, int, mulberry32, pick, range, shuffle } from './prng.ts';
import type { ChartScene, OrnamentScene, PhotoTone, PosterScene, SceneSpec, ViewScene } from './scene.ts';

export type { SceneSpec } from './scene.ts';

export type Role = 'admin' | 'archivist' | 'editor' | 'manager';

export interface DemoPerson {
  email: string;
  displayName: string;
  role: Role;
  /** for local demo sign-in only */
  password: string;
}

export interface DemoSubject {
  key: string;
  prefLabel: string;
  kind: 'subject' | 'form';
  broaderKey?: string;
  altLabels: string[];
  notation: string;
  scopeNote: string;
  altTextPhrase: string;
  status: 'draft' | 'active' | 'retired';
}

export interface DemoItem {
  identifier: string;
  fileName: string;
  caption: string;
  creator: string;
  dateText: string;
  rights: string;
  /**
   * Keys of the subjects (and exactly one form) this item truly shows, always the most specific
   * subject ("sailing-ship", not "vessel"); used to render it and to seed some reviewed decisions.
   */
  truth: string[];
  /** the drawing program for the image */
  scene: SceneSpec;
  /** a few items are already reviewed in the demo */
  reviewed?: { altText: string; decorative: boolean; reviewerEmail: string; approvedAt: string };
  /** a note when a historical caption uses outdated or harmful language */
  captionFlag?: string;
}

export interface DemoCollection {
  slug: string;
  name: string;
  description: string;
  medium: string;
  altTextLanguage: string;
  houseStyle: string;
  subjects: DemoSubject[];
  items: DemoItem[];
}

export interface DemoScenario {
  institution: { name: string; shortName: string; domain: string };
  people: DemoPerson[];
  collections: DemoCollection[];
}

export const DEMO_PASSWORD = 'harbour-demo-2026';
export const DEMO_INSTITUTION = { name: 'Kestrelmouth Harbour Museum', shortName: 'KHM', domain: 'kestrelmouth-harbour.example' } as const;

const PEOPLE: Array<[string, Role]> = [
  ['Noor Eastwick', 'admin'],
  ['Callum Brightling', 'admin'],
  ['Odile Brackwater', 'archivist'],
  ['Tobias Quillon', 'archivist'],
  ['Mirela Quaystone', 'editor'],
  ['Jonah Inkpen', 'editor'],
  ['Sunniva Tarrant', 'editor'],
  ['Ewan Saltcote', 'manager'],
  ['Hester Amblecroft', 'manager'],
];

/** The invented staff of the demo institution (also offered by the local identity provider). */
export function demoPeople(): DemoPerson[] {
  return PEOPLE.map(([displayName, role]) => ({
    displayName,
    role,
    email: `${displayName.toLowerCase().replace(/[^a-z ]/g, '').replace(/ /g, '.')}@${DEMO_INSTITUTION.domain}`,
    password: DEMO_PASSWORD,
  }));
}

// ---------------------------------------------------------------------------------------------
// Vocabularies

type SubjectDef = Omit<DemoSubject, 'notation' | 'status'> & { code: string; status?: DemoSubject['status'] };

const COMMON: Record<string, SubjectDef> = {
  vessel: {
    key: 'vessel',
    code: 'V',
    prefLabel: 'vessel',
    kind: 'subject',
    altLabels: ['ship', 'boat', 'craft'],
    scopeNote: 'Any craft afloat. Use the narrower subject when the kind of vessel can be told.',
    altTextPhrase: 'a vessel',
  },
  'sailing-ship': {
    key: 'sailing-ship',
    code: 'V-01',
    prefLabel: 'sailing ship',
    kind: 'subject',
    broaderKey: 'vessel',
    altLabels: ['sailing vessel', 'barque', 'brig', 'schooner', 'cutter'],
    scopeNote: 'A vessel under sail or with masts and rigging prominent: barques, brigs, schooners, cutters and smacks.',
    altTextPhrase: 'a sailing ship',
  },
  steamship: {
    key: 'steamship',
    code: 'V-02',
    prefLabel: 'steamship',
    kind: 'subject',
    broaderKey: 'vessel',
    altLabels: ['steamer', 'paddle steamer', 'steam tug', 'collier'],
    scopeNote: 'A vessel driven by steam, recognised by its funnel and usually its smoke; includes paddle steamers and tugs.',
    altTextPhrase: 'a steamship',
  },
  'rowing-boat': {
    key: 'rowing-boat',
    code: 'V-03',
    prefLabel: 'rowing boat',
    kind: 'subject',
    broaderKey: 'vessel',
    altLabels: ['gig', 'skiff', 'ferry boat', 'dinghy'],
    scopeNote: 'A small open boat pulled with oars. Rowers in it are not indexed as people at work.',
    altTextPhrase: 'a rowing boat',
  },
  'harbour-structure': {
    key: 'harbour-structure',
    code: 'H',
    prefLabel: 'harbour structure',
    kind: 'subject',
    altLabels: ['harbour works', 'maritime structure'],
    scopeNote: 'Built works of the harbour and coast. Use the narrower subject where possible.',
    altTextPhrase: 'a harbour structure',
  },
  lighthouse: {
    key: 'lighthouse',
    code: 'H-01',
    prefLabel: 'lighthouse',
    kind: 'subject',
    broaderKey: 'harbour-structure',
    altLabels: ['light', 'lighthouse tower', 'pier-head light'],
    scopeNote: 'A tower with a lantern, on a headland, a rock or a pier head, lit or unlit.',
    altTextPhrase: 'a lighthouse',
  },
  pier: {
    key: 'pier',
    code: 'H-02',
    prefLabel: 'pier',
    kind: 'subject',
    broaderKey: 'harbour-structure',
    altLabels: ['jetty', 'mole', 'breakwater', 'promenade pier'],
    scopeNote: 'A timber or stone structure running out into the water on piles or walls, with or without a shelter on its head.',
    altTextPhrase: 'a pier',
  },
  crane: {
    key: 'crane',
    code: 'H-03',
    prefLabel: 'harbour crane',
    kind: 'subject',
    broaderKey: 'harbour-structure',
    altLabels: ['crane', 'steam crane', 'derrick', 'hoist'],
    scopeNote: 'A quayside crane with a jib and hoisting rope, with or without a load.',
    altTextPhrase: 'a harbour crane',
  },
  'people-at-work': {
    key: 'people-at-work',
    code: 'P',
    prefLabel: 'people at work',
    kind: 'subject',
    altLabels: ['labourers', 'porters', 'dock workers', 'net menders'],
    scopeNote: 'Figures working ashore: carrying, hauling, rolling casks, wheeling barrows, mending nets.',
    altTextPhrase: 'people at work',
  },
  weather: {
    key: 'weather',
    code: 'W',
    prefLabel: 'weather',
    kind: 'subject',
    altLabels: ['sky', 'conditions'],
    scopeNote: 'Weather that is a subject of the picture, not merely its sky. Use the narrower subject.',
    altTextPhrase: 'the weather',
  },
  storm: {
    key: 'storm',
    code: 'W-01',
    prefLabel: 'storm',
    kind: 'subject',
    broaderKey: 'weather',
    altLabels: ['gale', 'heavy weather', 'tempest', 'squall'],
    scopeNote: 'Dark sky, driving rain and heavy seas.',
    altTextPhrase: 'a storm',
  },
  seabirds: {
    key: 'seabirds',
    code: 'B',
    prefLabel: 'seabirds',
    kind: 'subject',
    altLabels: ['gulls', 'seagulls', 'birds'],
    scopeNote: 'Gulls and other seabirds in flight or at rest, when they can be made out.',
    altTextPhrase: 'gulls',
  },
};

function vocabulary(prefix: string, defs: SubjectDef[]): DemoSubject[] {
  return defs.map(({ code, status, ...rest }) => ({ ...rest, notation: `${prefix}-${code}`, status: status ?? 'active' }));
}

const c = (key: string): SubjectDef => {
  const d = COMMON[key];
  if (!d) throw new Error(`no common subject ${key}`);
  return d;
};

const PLATE_SUBJECTS = vocabulary('PL', [
  c('vessel'),
  c('sailing-ship'),
  c('steamship'),
  c('rowing-boat'),
  c('harbour-structure'),
  c('lighthouse'),
  c('pier'),
  c('crane'),
  c('people-at-work'),
  c('weather'),
  c('storm'),
  c('seabirds'),
  {
    key: 'marine-view',
    code: 'X-01',
    prefLabel: 'marine view',
    kind: 'subject',
    altLabels: ['sea piece', 'seascape'],
    scopeNote: 'Retired: too broad to help a reader. Index the vessels, structures and weather shown instead.',
    altTextPhrase: 'a view of the sea',
    status: 'retired',
  },
  {
    key: 'engraving',
    code: 'F-01',
    prefLabel: 'engraving',
    kind: 'form',
    altLabels: ['engraved plate', 'steel engraving', 'print'],
    scopeNote: 'A pictorial plate printed from an engraved metal plate: ink lines and hatching on paper.',
    altTextPhrase: 'an engraving',
  },
  {
    key: 'ornament',
    code: 'F-02',
    prefLabel: 'ornamental plate',
    kind: 'form',
    altLabels: ['border', 'vignette', 'decorative plate'],
    scopeNote: 'Borders, tailpieces and ornaments printed for decoration; usually marked decorative.',
    altTextPhrase: 'an ornamental border',
  },
  {
    key: 'chart',
    code: 'F-03',
    prefLabel: 'engraved chart',
    kind: 'form',
    altLabels: ['sea chart', 'harbour plan', 'map'],
    scopeNote: 'A chart or plan of the coast and harbour engraved for the almanacs, with soundings.',
    altTextPhrase: 'an engraved chart',
  },
]);

const PHOTO_SUBJECTS = vocabulary('GP', [
  c('vessel'),
  c('sailing-ship'),
  c('steamship'),
  c('rowing-boat'),
  c('harbour-structure'),
  c('lighthouse'),
  c('pier'),
  c('crane'),
  c('people-at-work'),
  c('weather'),
  c('storm'),
  {
    key: 'fog',
    code: 'W-02',
    prefLabel: 'fog',
    kind: 'subject',
    broaderKey: 'weather',
    altLabels: ['sea fret', 'mist', 'haze'],
    scopeNote: 'Fog or sea fret that veils the distance. Draft: the team is still collecting examples.',
    altTextPhrase: 'fog',
    status: 'draft',
  },
  c('seabirds'),
  {
    key: 'photograph',
    code: 'F-01',
    prefLabel: 'photograph',
    kind: 'form',
    altLabels: ['glass-plate negative', 'glass plate', 'photographic print'],
    scopeNote: 'A scan of a glass-plate negative, shown as a positive.',
    altTextPhrase: 'a photograph',
  },
  {
    key: 'lantern-slide',
    code: 'F-02',
    prefLabel: 'lantern slide',
    kind: 'form',
    altLabels: ['magic-lantern slide', 'glass slide'],
    scopeNote: 'A positive on glass, masked and labelled for projection at the Harbour Board’s public evenings.',
    altTextPhrase: 'a lantern slide',
  },
]);

const PRINT_SUBJECTS = vocabulary('PC', [
  c('vessel'),
  c('sailing-ship'),
  c('steamship'),
  c('rowing-boat'),
  c('harbour-structure'),
  c('lighthouse'),
  c('pier'),
  c('seabirds'),
  c('weather'),
  {
    key: 'sun',
    code: 'W-03',
    prefLabel: 'sunshine',
    kind: 'subject',
    broaderKey: 'weather',
    altLabels: ['sun', 'fine weather', 'sunny day'],
    scopeNote: 'A sun with rays or a bright sunny sky shown as part of the design.',
    altTextPhrase: 'a bright sun',
  },
  {
    key: 'coastline',
    code: 'G-01',
    prefLabel: 'coastline',
    kind: 'subject',
    altLabels: ['coast', 'shore', 'shoreline'],
    scopeNote: 'The line of the coast as drawn on a chart or map.',
    altTextPhrase: 'the coastline',
  },
  {
    key: 'compass-rose',
    code: 'G-02',
    prefLabel: 'compass rose',
    kind: 'subject',
    altLabels: ['wind rose', 'compass card'],
    scopeNote: 'The star of compass points printed on charts and maps.',
    altTextPhrase: 'a compass rose',
  },
  {
    key: 'poster',
    code: 'F-01',
    prefLabel: 'poster',
    kind: 'form',
    altLabels: ['bill', 'placard', 'advertisement'],
    scopeNote: 'A printed bill for display, with large lettering.',
    altTextPhrase: 'a poster',
  },
  {
    key: 'map',
    code: 'F-02',
    prefLabel: 'printed chart',
    kind: 'form',
    altLabels: ['map', 'chart', 'plan'],
    scopeNote: 'A printed chart or map of the harbour and coast.',
    altTextPhrase: 'a chart',
  },
]);

// ---------------------------------------------------------------------------------------------
// Invented names and places

const SAILING_NAMES = ['CURLEW', 'HESPER', 'TANSY BELL', 'KITTIWAKE', 'NORTHERN LASS', 'BRIGHTWATER', 'JENNY CORRAN', 'SEA LINNET', 'ARDENT', 'MARIGOLD', 'WILLING MAID', 'PETREL', 'ROSE OF SKERROW', 'DILIGENT', 'MAUD ELLERY', 'FAITHFUL'];
const STEAM_NAMES = ['AMBERVALE', 'WARDLE', 'PELLOW QUEEN', 'SKERROW', 'GANNET', 'KESTREL BELLE', 'LADY TALLOW', 'BRACKENHOLM', 'CORMORANT', 'HARBOUR BELLE', 'ORLAND', 'STALWART'];
const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

function titleCase(name: string): string {
  return name
    .toLowerCase()
    .split(' ')
    .map((w) => (w === 'of' ? w : w.charAt(0).toUpperCase() + w.slice(1)))
    .join(' ');
}

function dateText(rng: Rng, year: number): string {
  const r = rng();
  if (r < 0.35) return String(year);
  if (r < 0.6) return `c. ${year}`;
  if (r < 0.7) return `${Math.floor(year / 10) * 10}s`;
  return `${int(rng, 1, 28)} ${pick(rng, MONTHS)} ${year}`;
}

// ---------------------------------------------------------------------------------------------
// Captions

function shipWord(rng: Rng, comp: Composition): { sailing?: string; steam?: string; rowing?: string } {
  const out: { sailing?: string; steam?: string; rowing?: string } = {};
  for (const el of comp.picture.elements) {
    if (el.kind === 'sailing-ship' && !out.sailing) {
      const kind = el.masts === 3 ? pick(rng, ['barque', 'full-rigged ship']) : el.masts === 2 ? (el.rig === 'square' ? 'brig' : 'schooner') : pick(rng, ['cutter', 'fishing smack']);
      out.sailing = el.name ? `the ${kind} ${titleCase(el.name)}` : `a ${kind}`;
    }
    if (el.kind === 'steamship' && !out.steam) {
      const kind = el.paddle ? 'paddle steamer' : pick(rng, ['steamer', 'screw steamer', 'steam collier', 'steam tug']);
      out.steam = el.name ? `the ${kind} ${titleCase(el.name)}` : `a ${kind}`;
    }
    if (el.kind === 'rowing-boat' && !out.rowing) out.rowing = el.rowers === 2 ? pick(rng, ['the pilot gig', 'a ferry boat', 'a harbour skiff']) : pick(rng, ['a waterman in his skiff', 'a small boat']);
  }
  return out;
}

function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

function lightName(comp: Composition): string {
  return comp.lightSite === 'pier' ? 'the pier-head light' : comp.lightSite === 'rock' ? 'the Skerrow Rock light' : 'Gannet Head light';
}

function caption(rng: Rng, primary: Feature, comp: Composition): string {
  const f = featuresOf(comp.picture);
  const w = shipWord(rng, comp);
  let main: string;
  switch (primary) {
    case 'sailing-ship':
      main = `${capitalise(w.sailing ?? 'a sailing ship')} ${pick(rng, ['standing in for Kestrelmouth Roads', 'at anchor off Gannet Head', 'running before the wind', 'leaving harbour on the ebb', 'lying off the North Pier', 'beating out past Skerrow Rock'])}`;
      break;
    case 'steamship':
      main = `${capitalise(w.steam ?? 'a steamer')} ${pick(rng, ['leaving the North Pier', 'in Kestrelmouth Roads', 'making for the Inner Basin', 'off the South Mole', 'outward bound'])}`;
      break;
    case 'rowing-boat':
      main = capitalise(pick(rng, ['watermen pulling off from the Fish Steps', 'the ferry crossing to Pellow Sands', 'rowing out to the moorings', `${w.rowing ?? 'a small boat'} at the harbour mouth`]));
      break;
    case 'lighthouse':
      main = comp.lightSite === 'pier' ? 'The pier-head light, North Pier' : comp.lightSite === 'rock' ? 'The lighthouse on Skerrow Rock' : pick(rng, ['Gannet Head light', 'The light on Gannet Head, from the sea', 'Gannet Head lighthouse and the cliffs']);
      break;
    case 'pier':
      main = pick(rng, ['The North Pier from Pellow Sands', 'The promenade pier', 'The South Mole, looking seaward', 'The new pier, Kestrelmouth']);
      break;
    case 'crane':
      main = pick(rng, ['The steam crane, Customs Quay', 'Crane at the Inner Basin', 'Hoisting cargo on Customs Quay']);
      break;
    case 'people-at-work':
      main = pick(rng, ['Porters at Customs Quay', 'Quay labourers at work', 'Unloading on the Fish Quay', 'Harbour hands at the Inner Basin']);
      break;
    case 'storm':
      main = `A gale at Kestrelmouth${w.sailing ? `, ${w.sailing} in distress` : w.steam ? `, ${w.steam} riding it out` : ''}`;
      break;
    case 'fog':
      main = pick(rng, ['Sea fret in the Roads', 'Fog over the harbour mouth', 'A foggy morning at the Inner Basin']);
      break;
    default:
      main = 'Kestrelmouth harbour';
  }
  const extras: string[] = [];
  if (primary !== 'lighthouse' && f.has('lighthouse')) extras.push(`with ${lightName(comp)} beyond`);
  if (primary !== 'pier' && f.has('pier') && primary !== 'lighthouse') extras.push('off the North Pier');
  if (primary !== 'steamship' && f.has('steamship') && w.steam) extras.push(`${w.steam} astern`);
  if (primary !== 'sailing-ship' && primary !== 'storm' && f.has('sailing-ship') && w.sailing) extras.push(`${w.sailing} in the offing`);
  if (primary !== 'crane' && f.has('crane')) extras.push('the crane working');
  let text = main;
  if (extras.length > 0) text += `, ${extras.slice(0, 2).join(', ')}`;
  if (primary !== 'storm' && f.has('storm')) text += ', heavy weather';
  if (primary !== 'fog' && f.has('fog')) text += ', in fog';
  return text;
}

// ---------------------------------------------------------------------------------------------
// Alt text, following the house style: open with the form, no "image of", under 125 characters,
// quote the lettering that can be read in the image.

const PHRASE_ORDER = ['sailing-ship', 'steamship', 'rowing-boat', 'lighthouse', 'pier', 'crane', 'people-at-work', 'seabirds', 'sun', 'coastline', 'compass-rose'];

function joinList(parts: string[]): string {
  if (parts.length <= 1) return parts.join('');
  return `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}`;
}

export function composeAltText(item: Pick<DemoItem, 'truth' | 'scene'>, subjects: DemoSubject[]): string {
  const byKey = new Map(subjects.map((s) => [s.key, s]));
  const form = item.truth.map((k) => byKey.get(k)).find((s) => s?.kind === 'form');
  if (!form) throw new Error('item without a form');
  const scene = item.scene;
  const shipNames = scene.layout === 'view' ? scene.elements.flatMap((e) => ((e.kind === 'sailing-ship' || e.kind === 'steamship') && e.name ? [[e.kind, e.name] as const] : [])) : [];
  const phrases: string[] = [];
  for (const key of PHRASE_ORDER) {
    if (!item.truth.includes(key)) continue;
    const s = byKey.get(key);
    if (!s) continue;
    const named = shipNames.find(([k]) => k === key);
    phrases.push(named ? `${s.altTextPhrase} named "${named[1]}"` : s.altTextPhrase);
  }
  const weather = item.truth.includes('storm') ? ' in a storm' : item.truth.includes('fog') ? ' in fog' : '';
  const quoted = (texts: string[]) => texts.map((t) => `"${t}"`).join(', ');
  const build = (ph: string[]): string => {
    const list = joinList(ph);
    switch (scene.layout) {
      case 'view': {
        const lead = form.key === 'lantern-slide' ? 'Lantern slide' : form.key === 'photograph' ? 'Photograph' : 'Engraving';
        if (scene.label) return `${lead} labelled "${scene.label}": ${list}${weather}.`;
        if (scene.lettering) return `${lead} titled "${scene.lettering.toUpperCase()}": ${list}${weather}.`;
        return `${lead} of ${list}${weather}.`;
      }
      case 'poster':
        return `Poster reading ${quoted([scene.title, scene.subtitle, scene.footer])}, with ${list}.`;
      case 'chart': {
        const town = scene.title.includes(scene.town) ? '' : `, marked "${scene.town}"`;
        return ph.length
          ? `Chart titled "${scene.title}", "${scene.subtitle}"${town}, showing ${list}.`
          : `Engraved chart titled "${scene.title}", "${scene.subtitle}"${town}.`;
      }
      case 'ornament':
        return '';
    }
  };
  let ph = [...phrases];
  let text = build(ph);
  while (text.length > 125 && ph.length > 1) {
    ph = ph.slice(0, -1);
    text = build(ph);
  }
  if (text.length > 125 && scene.layout === 'poster') text = `Poster reading ${quoted([scene.title, scene.subtitle])}, with ${ph.join('')}.`;
  return text;
}

// ---------------------------------------------------------------------------------------------
// Collections

interface Draft {
  caption: string;
  creator: string;
  year: number;
  scene: SceneSpec;
  truth: string[];
  captionFlag?: string;
  noReview?: boolean;
}

function truthFor(form: string, comp: Composition, allowed: DemoSubject[]): string[] {
  const keys = new Set(allowed.map((s) => s.key));
  const truth = [form, ...[...featuresOf(comp.picture)].filter((f) => f !== 'sun' || keys.has('sun'))];
  for (const k of truth) if (!keys.has(k)) throw new Error(`subject ${k} is not in the vocabulary`);
  return truth;
}

/** pick the extra features for a picture around its main subject */
function wishList(rng: Rng, primary: Feature, probs: Partial<Record<Feature, number>>): Set<Feature> {
  const want = new Set<Feature>([primary]);
  if (primary === 'storm' || primary === 'fog') want.add(chance(rng, 0.6) ? 'sailing-ship' : chance(rng, 0.5) ? 'lighthouse' : 'steamship');
  for (const [f, p] of Object.entries(probs) as Array<[Feature, number]>) if (f !== primary && chance(rng, p)) want.add(f);
  if (want.has('storm') && want.has('fog')) want.delete(primary === 'fog' ? 'storm' : 'fog');
  if (want.has('storm') || want.has('fog')) {
    want.delete('crane');
    want.delete('people-at-work');
  }
  // keep pictures legible: at most four things besides weather and birds
  const things = [...want].filter((f) => f !== primary && f !== 'storm' && f !== 'fog' && f !== 'seabirds');
  for (const f of shuffle(rng, things).slice(Math.max(0, 3 - (want.has('seabirds') ? 1 : 0)))) want.delete(f);
  if (!(primary === 'storm' || primary === 'fog') && [...want].every((f) => f === 'seabirds' || f === 'storm' || f === 'fog')) want.add('sailing-ship');
  return want;
}

function rotation<T>(rng: Rng, weighted: Array<[T, number]>): () => T {
  let queue: T[] = [];
  return () => {
    if (queue.length === 0) queue = shuffle(rng, weighted.flatMap(([v, n]) => Array.from({ length: n }, () => v)));
    return queue.shift() as T;
  };
}

const PLATE_CREATORS = ['Elias Wrenfield, engraver', 'Wrenfield & Daughter, engravers', 'Drawn by Harriet Coombe; engraved by Elias Wrenfield', 'After Tobias Marrable; engraved by the Wrenfield workshop', 'Engraver not recorded'];
const PLATE_PLACES = ['Kestrelmouth Roads', 'Gannet Head', 'Skerrow Rock', 'Pellow Sands', 'Tallow Point', 'the Harbour Mouth'];

function plateDrafts(rng: Rng): Draft[] {
  const total = 180;
  const slots = shuffle(rng, Array.from({ length: total }, (_, i) => i));
  const ornamentSlots = new Set(slots.slice(0, 10));
  const chartSlots = new Set(slots.slice(10, 18));
  const next = rotation<Feature>(rng, [
    ['sailing-ship', 5],
    ['steamship', 2],
    ['rowing-boat', 2],
    ['lighthouse', 3],
    ['pier', 2],
    ['crane', 2],
    ['people-at-work', 2],
    ['storm', 2],
  ]);
  const sailing = shuffle(rng, SAILING_NAMES);
  const steam = shuffle(rng, STEAM_NAMES);
  const chartTitles = shuffle(rng, ['KESTRELMOUTH ROADS', 'APPROACHES TO GANNET HEAD', 'SKERROW ROCK AND PELLOW SANDS', 'THE INNER BASIN', 'TALLOW POINT TO GANNET HEAD', 'KESTRELMOUTH HARBOUR', 'THE SOUTH MOLE AND ROADS', 'PELLOW BAY']);
  const out: Draft[] = [];
  let chartIdx = 0;
  let ornIdx = 0;
  for (let i = 0; i < total; i++) {
    const seed = hashString(`KHM-PL-${i + 1}`);
    let year = int(rng, 1852, 1898);
    if (ornamentSlots.has(i)) {
      const border = (['rope', 'wave', 'laurel', 'shell'] as const)[ornIdx % 4] as OrnamentScene['border'];
      const centre = (['anchor', 'knot', 'star', 'shell', 'anchor'] as const)[ornIdx % 5] as OrnamentScene['centre'];
      ornIdx++;
      const scene: OrnamentScene = { layout: 'ornament', style: 'engraving', seed, aspect: chance(rng, 0.6) ? range(rng, 0.74, 0.84) : range(rng, 1.25, 1.4), border, centre, visibleText: [] };
      out.push({
        caption: `Ornamental ${border} border with ${centre === 'knot' ? 'a reef knot' : `${centre === 'anchor' ? 'an' : 'a'} ${centre}`} medallion, from the Kestrelmouth Almanack`,
        creator: pick(rng, PLATE_CREATORS),
        year,
        scene,
        truth: ['ornament'],
      });
      continue;
    }
    if (chartSlots.has(i)) {
      const title = chartTitles[chartIdx % chartTitles.length] as string;
      chartIdx++;
      const coast = pick(rng, ['left', 'right', 'top', 'bottom'] as const);
      const scene: ChartScene = {
        layout: 'chart',
        style: 'engraving',
        seed,
        aspect: range(rng, 1.3, 1.45),
        title,
        subtitle: `Surveyed ${year - int(rng, 1, 6)}`,
        town: 'KESTRELMOUTH',
        coast,
        compass: { x: coast === 'left' ? range(rng, 0.62, 0.78) : coast === 'right' ? range(rng, 0.22, 0.38) : range(rng, 0.25, 0.45), y: coast === 'top' ? range(rng, 0.6, 0.72) : coast === 'bottom' ? range(rng, 0.28, 0.4) : range(rng, 0.25, 0.4), size: range(rng, 0.13, 0.17) },
        light: chance(rng, 0.7),
        palette: 0,
        visibleText: [],
      };
      scene.visibleText = [title, scene.subtitle, scene.town];
      out.push({ caption: `Chart: ${titleCase(title)}, from the Kestrelmouth Almanack`, creator: 'Harbour Board Survey Office; engraved by Elias Wrenfield', year, scene, truth: ['chart'] });
      continue;
    }
    const primary = next();
    if (primary === 'steamship' && year < 1862) year += 12;
    const want = wishList(rng, primary, { 'sailing-ship': 0.35, steamship: year > 1865 ? 0.15 : 0.04, 'rowing-boat': 0.3, lighthouse: 0.3, pier: 0.2, crane: 0.08, 'people-at-work': 0.12, seabirds: 0.45, storm: 0.08 });
    if (year < 1862 && primary !== 'steamship') want.delete('steamship');
    const portrait = primary === 'lighthouse' && chance(rng, 0.5);
    const aspect = portrait ? range(rng, 0.78, 0.86) : range(rng, 1.22, 1.5);
    const comp = compose(rng, { features: want, primary, aspect: aspect * 1.02, names: { sailing, steam }, nameChance: 0.45 });
    rotateUsed(sailing, comp.shipNames);
    rotateUsed(steam, comp.shipNames);
    let cap = caption(rng, primary, comp);
    const lettered = chance(rng, 0.35);
    const lettering = lettered ? pick(rng, [cap.split(',')[0] as string, `${pick(rng, PLATE_PLACES)}, Kestrelmouth`]) : undefined;
    const scene: ViewScene = {
      layout: 'view',
      style: 'engraving',
      seed,
      aspect,
      ...comp.picture,
      ...(lettering ? { lettering } : {}),
      visibleText: [...(lettering ? [lettering.toUpperCase()] : []), ...comp.shipNames.filter((n) => sceneHasName(comp, n))],
    };
    if (lettering) cap = `"${lettering}". ${cap}`;
    out.push({ caption: cap, creator: pick(rng, PLATE_CREATORS), year, scene, truth: truthFor('engraving', comp, PLATE_SUBJECTS) });
  }
  // one historical caption with outdated wording
  const flagged = out.find((d) => d.scene.layout === 'view' && d.truth.includes('rowing-boat') && !d.truth.includes('storm'));
  if (flagged) {
    flagged.caption = 'The deaf-and-dumb ferryman at the Fish Steps';
    flagged.captionFlag =
      'The catalogue caption (1870s) calls the ferryman "deaf-and-dumb", an outdated term that Deaf people find offensive. Keep the original caption as a quotation and use "deaf" or leave it out of new alt text.';
    flagged.noReview = true;
  }
  return out;
}

/** move names just used to the end of the list, so the next pictures use other names */
function rotateUsed(list: string[], used: string[]): void {
  for (const n of used) {
    const at = list.indexOf(n);
    if (at >= 0) list.push(...list.splice(at, 1));
  }
}

function sceneHasName(comp: Composition, name: string): boolean {
  return comp.picture.elements.some((e) => (e.kind === 'sailing-ship' || e.kind === 'steamship') && e.name === name);
}

const SLIDE_TITLES: Partial<Record<Feature, string[]>> = {
  'sailing-ship': ['UNDER SAIL', 'IN THE ROADS', 'OFF GANNET HEAD'],
  steamship: ['THE PACKET STEAMER', 'LEAVING HARBOUR', 'IN THE ROADS'],
  'rowing-boat': ['THE FERRY', 'THE PILOT GIG', 'FISH STEPS'],
  pier: ['THE NORTH PIER', 'THE SOUTH MOLE', 'THE PROMENADE PIER'],
  crane: ['CUSTOMS QUAY', 'THE STEAM CRANE', 'THE INNER BASIN'],
  'people-at-work': ['CUSTOMS QUAY', 'THE FISH QUAY', 'QUAY HANDS'],
  storm: ['A GALE', 'HEAVY WEATHER', 'THE GREAT GALE'],
  fog: ['SEA FRET', 'FOG IN THE ROADS'],
};

const PHOTO_CREATORS = ['Ada Penhallick', 'Quarrender & Son, photographers', 'Septimus Rook', 'Harbour Board photographer, not recorded'];

function photoDrafts(rng: Rng): Draft[] {
  const total = 120;
  const slideSlots = new Set(shuffle(rng, Array.from({ length: total }, (_, i) => i)).slice(0, 28));
  const next = rotation<Feature>(rng, [
    ['steamship', 4],
    ['sailing-ship', 2],
    ['rowing-boat', 2],
    ['lighthouse', 2],
    ['pier', 2],
    ['crane', 2],
    ['people-at-work', 3],
    ['storm', 1],
    ['fog', 1],
  ]);
  const sailing = shuffle(rng, SAILING_NAMES);
  const steam = shuffle(rng, STEAM_NAMES);
  const out: Draft[] = [];
  let slideNo = int(rng, 3, 12);
  for (let i = 0; i < total; i++) {
    const seed = hashString(`KHM-GP-${i + 1}`);
    const year = int(rng, 1889, 1930);
    const primary = next();
    const want = wishList(rng, primary, { steamship: 0.3, 'sailing-ship': 0.25, 'rowing-boat': 0.25, lighthouse: 0.2, pier: 0.25, crane: 0.12, 'people-at-work': 0.15, seabirds: 0.35, fog: 0.05, storm: 0.05 });
    const slide = slideSlots.has(i);
    const portrait = !slide && primary === 'lighthouse' && chance(rng, 0.5);
    const aspect = slide ? range(rng, 0.98, 1.04) : portrait ? range(rng, 0.76, 0.8) : range(rng, 1.25, 1.34);
    const picAspect = slide ? (aspect * 0.8) / 0.74 : aspect;
    const comp = compose(rng, { features: want, primary, aspect: picAspect, names: { sailing, steam }, nameChance: 0.5 });
    rotateUsed(sailing, comp.shipNames);
    rotateUsed(steam, comp.shipNames);
    const cap = caption(rng, primary, comp);
    const tone: PhotoTone = pick(rng, ['sepia', 'sepia', 'grey', 'grey', 'selenium'] as const);
    const names = comp.shipNames.filter((n) => sceneHasName(comp, n));
    let label: string | undefined;
    if (slide) {
      slideNo += int(rng, 1, 4);
      label = `No. ${slideNo}. ${(cap.split(',')[0] as string).toUpperCase()}`;
      if (label.length > 34) {
        const title = primary === 'lighthouse' ? lightName(comp).toUpperCase() : pick(rng, SLIDE_TITLES[primary] ?? ['KESTRELMOUTH HARBOUR']);
        label = `No. ${slideNo}. ${title}`;
      }
    }
    const scene: ViewScene = {
      layout: 'view',
      style: 'photograph',
      seed,
      aspect,
      ...comp.picture,
      tone,
      mount: slide ? 'lantern-slide' : 'glass-plate',
      ...(label ? { label } : {}),
      visibleText: [...(label ? [label] : []), ...names],
    };
    out.push({
      caption: slide ? `Lantern slide: ${cap}` : `${cap}. Harbour Board negative ${int(rng, 20, 900)}`,
      creator: pick(rng, PHOTO_CREATORS),
      year,
      scene,
      truth: truthFor(slide ? 'lantern-slide' : 'photograph', comp, PHOTO_SUBJECTS),
    });
  }
  const mend = out.find((d) => d.scene.layout === 'view' && d.scene.elements.some((e) => e.kind === 'worker' && e.pose === 'mend'));
  const anyWork = mend ?? out.find((d) => d.truth.includes('people-at-work'));
  if (anyWork) {
    anyWork.caption = 'Fishwives mending nets on the Fish Quay. Harbour Board negative 118';
    anyWork.captionFlag =
      'The caption uses "fishwives", a dated term that many readers find belittling. Describe the people by their work ("net menders", "fish workers") in new text and keep the original caption as a quotation.';
    anyWork.noReview = true;
  }
  const steamer = out.find((d) => d !== anyWork && d.truth.includes('steamship') && d.truth.includes('photograph'));
  if (steamer) {
    steamer.caption = 'Steamer discharging a cargo of tea from the Orient, Customs Quay. Harbour Board negative 402';
    steamer.captionFlag =
      'The caption calls Asia "the Orient", an outdated and Eurocentric term. Name the port or region if the shipping records give it, and keep the original caption as a quotation.';
    steamer.noReview = true;
  }
  return out;
}

interface PosterDef {
  caption: string;
  title: string;
  subtitle: string;
  footer: string;
  features: Feature[];
  primary: Feature;
  year: number;
  creator: string;
}

const POSTERS: PosterDef[] = [
  { caption: 'Poster for the Kestrelmouth Regatta, 17 August 1912', title: 'KESTRELMOUTH REGATTA', subtitle: 'SATURDAY 17 AUGUST 1912', footer: 'Sailing matches · Rowing races · Band', features: ['sailing-ship', 'rowing-boat', 'seabirds'], primary: 'sailing-ship', year: 1912, creator: 'Printed by Lanyard & Vane, Kestrelmouth' },
  { caption: 'Poster: steamer excursions daily from the North Pier', title: 'STEAMER EXCURSIONS', subtitle: 'DAILY FROM THE NORTH PIER', footer: 'Kestrelmouth Steam Packet Co.', features: ['steamship', 'pier', 'seabirds'], primary: 'steamship', year: 1904, creator: 'Kestrelmouth Steam Packet Company, publisher' },
  { caption: 'Railway poster: Visit Kestrelmouth, the sunny harbour town', title: 'VISIT KESTRELMOUTH', subtitle: 'THE SUNNY HARBOUR TOWN', footer: 'Cheap return tickets from all stations', features: ['sun', 'lighthouse', 'sailing-ship'], primary: 'lighthouse', year: 1923, creator: 'Printed by Lanyard & Vane, Kestrelmouth' },
  { caption: 'Poster for the Gannet Head Light centenary exhibition, 1927', title: 'GANNET HEAD LIGHT', subtitle: 'CENTENARY 1827–1927', footer: 'Exhibition at the Harbour Board rooms', features: ['lighthouse', 'seabirds'], primary: 'lighthouse', year: 1927, creator: 'Harbour Board, publisher' },
  { caption: 'Poster: concerts at the Pier Pavilion', title: 'PIER PAVILION', subtitle: 'CONCERTS EVERY EVENING', footer: 'Admission to the pier twopence', features: ['pier', 'sun', 'rowing-boat'], primary: 'pier', year: 1909, creator: 'Printed by Lanyard & Vane, Kestrelmouth' },
  { caption: 'Poster: sailings to Skerrow by the paddle steamer Pellow Queen', title: 'SAIL TO SKERROW', subtitle: 'BY THE PADDLE STEAMER PELLOW QUEEN', footer: 'Tuesdays and Fridays in the season', features: ['steamship', 'lighthouse'], primary: 'steamship', year: 1898, creator: 'Kestrelmouth Steam Packet Company, publisher' },
  { caption: 'Poster for the Harbour Fair on Customs Quay, Whit Monday', title: 'HARBOUR FAIR', subtitle: 'WHIT MONDAY ON CUSTOMS QUAY', footer: 'Boat trips · Fish suppers · Fireworks', features: ['sailing-ship', 'steamship', 'seabirds', 'sun'], primary: 'sailing-ship', year: 1921, creator: 'Printed by Lanyard & Vane, Kestrelmouth' },
  { caption: 'Poster for the Rowing Club open races, 1895', title: 'ROWING CLUB', subtitle: 'OPEN RACES 1895', footer: 'Entries to the club house by 1 July', features: ['rowing-boat', 'pier'], primary: 'rowing-boat', year: 1895, creator: 'Kestrelmouth Rowing Club' },
  { caption: 'Poster: summer sailings from Kestrelmouth to Tallow Point', title: 'SUMMER SAILINGS', subtitle: 'KESTRELMOUTH TO TALLOW POINT', footer: 'Kestrelmouth Steam Packet Co.', features: ['steamship', 'sun', 'seabirds'], primary: 'steamship', year: 1929, creator: 'Kestrelmouth Steam Packet Company, publisher' },
  { caption: 'Poster: sea bathing at Pellow Sands', title: 'BATHE AT PELLOW SANDS', subtitle: 'SAFE SEA BATHING', footer: 'Machines for hire on the beach', features: ['sun', 'rowing-boat', 'seabirds'], primary: 'rowing-boat', year: 1906, creator: 'Printed by Lanyard & Vane, Kestrelmouth' },
  { caption: 'Poster for Lifeboat Day, 2 July 1910', title: 'LIFEBOAT DAY', subtitle: 'SATURDAY 2 JULY 1910', footer: 'Collections on the North Pier', features: ['rowing-boat', 'lighthouse', 'pier'], primary: 'rowing-boat', year: 1910, creator: 'Kestrelmouth Lifeboat Committee' },
  { caption: 'Poster for the schooner race round Skerrow Rock', title: 'SCHOONER RACE', subtitle: 'ROUND SKERROW ROCK', footer: 'Starting gun 10 o’clock from the South Mole', features: ['sailing-ship', 'lighthouse', 'seabirds'], primary: 'sailing-ship', year: 1887, creator: 'Printed by Lanyard & Vane, Kestrelmouth' },
  { caption: 'Poster for the opening of the new promenade pier, 1883', title: 'NEW PROMENADE PIER', subtitle: 'OPENED 1 JUNE 1883', footer: 'Band of the Harbour Volunteers', features: ['pier', 'steamship', 'seabirds'], primary: 'pier', year: 1883, creator: 'Kestrelmouth Pier Company' },
];

const MAPS: Array<{ title: string; subtitle: string; year: number }> = [
  { title: 'KESTRELMOUTH HARBOUR', subtitle: 'For the use of visitors, 1902', year: 1902 },
  { title: 'THE ROADS AND APPROACHES', subtitle: 'Harbour Board, 1889', year: 1889 },
  { title: 'PELLOW BAY', subtitle: 'Bathing and boating, 1911', year: 1911 },
  { title: 'SKERROW ROCK', subtitle: 'Pilotage plan, 1868', year: 1868 },
  { title: 'GANNET HEAD', subtitle: 'With the new light, 1875', year: 1875 },
  { title: 'KESTRELMOUTH AND DISTRICT', subtitle: 'Steam Packet routes, 1925', year: 1925 },
  { title: 'THE INNER BASIN', subtitle: 'Berths and quays, 1896', year: 1896 },
];

function printDrafts(rng: Rng): Draft[] {
  const out: Draft[] = [];
  const order = shuffle(rng, [...POSTERS.map((p) => ({ poster: p })), ...MAPS.map((m) => ({ map: m }))]);
  let n = 0;
  for (const entry of order) {
    n++;
    const seed = hashString(`KHM-PC-${n}`);
    if ('poster' in entry) {
      const p = entry.poster;
      const aspect = range(rng, 0.66, 0.72);
      const comp = compose(rng, { features: new Set(p.features), primary: p.primary, aspect: (aspect * 0.89) / 0.56, names: { sailing: [], steam: [] }, nameChance: 0, poster: true });
      const scene: PosterScene = {
        layout: 'poster',
        style: 'lithograph',
        seed,
        aspect,
        palette: n % 4,
        title: p.title,
        subtitle: p.subtitle,
        footer: p.footer,
        picture: comp.picture,
        visibleText: [p.title, p.subtitle, p.footer],
      };
      out.push({ caption: p.caption, creator: p.creator, year: p.year, scene, truth: truthFor('poster', comp, PRINT_SUBJECTS) });
    } else {
      const m = entry.map;
      const coast = pick(rng, ['left', 'right', 'top', 'bottom'] as const);
      const scene: ChartScene = {
        layout: 'chart',
        style: 'lithograph',
        seed,
        aspect: range(rng, 1.25, 1.45),
        title: m.title,
        subtitle: m.subtitle,
        town: 'KESTRELMOUTH',
        coast,
        compass: { x: coast === 'left' ? range(rng, 0.62, 0.78) : coast === 'right' ? range(rng, 0.22, 0.38) : range(rng, 0.25, 0.45), y: coast === 'top' ? range(rng, 0.6, 0.72) : coast === 'bottom' ? range(rng, 0.28, 0.4) : range(rng, 0.25, 0.4), size: range(rng, 0.13, 0.17) },
        light: true,
        palette: n % 4,
        visibleText: [m.title, m.subtitle, 'KESTRELMOUTH'],
      };
      out.push({ caption: `${titleCase(m.title)}. ${m.subtitle}`, creator: 'Harbour Board Survey Office', year: m.year, scene, truth: ['map', 'coastline', 'compass-rose'] });
    }
  }
  return out;
}

function finish(rng: Rng, prefix: string, drafts: Draft[], subjects: DemoSubject[], ext: 'jpg' | 'png', rights: (year: number) => string, reviewShare: number, editors: string[]): DemoItem[] {
  const candidates = drafts.map((d, i) => ({ d, i })).filter(({ d }) => !d.noReview);
  const decorative = candidates.filter(({ d }) => d.truth.includes('ornament'));
  const others = shuffle(
    rng,
    candidates.filter(({ d }) => !d.truth.includes('ornament')),
  );
  const want = Math.round(drafts.length * reviewShare);
  const chosen = new Set<number>(decorative.slice(0, 5).map((x) => x.i));
  // at least one reviewed item of every form, then any others
  const forms = subjects.filter((sub) => sub.kind === 'form' && sub.key !== 'ornament').map((sub) => sub.key);
  for (const form of forms) {
    const first = others.find(({ d }) => d.truth.includes(form));
    if (first) chosen.add(first.i);
  }
  for (const { i } of others) {
    if (chosen.size >= want) break;
    chosen.add(i);
  }
  let reviewCount = 0;
  return drafts.map((d, i) => {
    const identifier = `${prefix}-${String(i + 1).padStart(4, '0')}`;
    const item: DemoItem = {
      identifier,
      fileName: `${identifier.toLowerCase()}.${ext}`,
      caption: d.caption,
      creator: d.creator,
      dateText: dateText(rng, d.year),
      rights: rights(d.year),
      truth: d.truth,
      scene: d.scene,
      ...(d.captionFlag ? { captionFlag: d.captionFlag } : {}),
    };
    if (chosen.has(i)) {
      const dec = d.truth.includes('ornament');
      const day = 5 + reviewCount * 2;
      const date = new Date(Date.UTC(2026, 0, day, 9 + (reviewCount % 7), (reviewCount * 17) % 60));
      item.reviewed = {
        altText: dec ? '' : composeAltText(item, subjects),
        decorative: dec,
        reviewerEmail: editors[reviewCount % editors.length] as string,
        approvedAt: date.toISOString(),
      };
      reviewCount++;
    }
    return item;
  });
}

export function buildDemoScenario(): DemoScenario {
  const rng = mulberry32(0x4b484d26);
  const team = demoPeople();
  const editors = team.filter((p) => p.role === 'editor').map((p) => p.email);
  const plates = plateDrafts(rng);
  const photos = photoDrafts(rng);
  const prints = printDrafts(rng);
  const museumRights = `© ${DEMO_INSTITUTION.name}, CC BY 4.0`;
  return {
    institution: { ...DEMO_INSTITUTION },
    people: team,
    collections: [
      {
        slug: 'wrenfield-plates',
        name: 'The Wrenfield Plates',
        description:
          'Engraved plates from the Kestrelmouth Almanack, 1852–1898, most from the Wrenfield workshop: harbour views, ornamental borders and a few engraved charts.',
        medium: 'engraving',
        altTextLanguage: 'en-GB',
        houseStyle:
          'Open with the form ("Engraving of …"). Quote engraved lettering and ship names exactly as they appear. Name places only when the lettering gives them. British spelling. Keep to 125 characters; put the rest in the long description. Borders and ornaments are decorative.',
        subjects: PLATE_SUBJECTS,
        items: finish(rng, 'KHM-PL', plates, PLATE_SUBJECTS, 'jpg', () => 'Public domain', 0.12, editors),
      },
      {
        slug: 'harbour-board-glass',
        name: 'Harbour Board Glass Plates',
        description: 'Glass-plate negatives and lantern slides made for the Kestrelmouth Harbour Board, 1889–1930, scanned as positives.',
        medium: 'photograph',
        altTextLanguage: 'en-GB',
        houseStyle:
          'Open with "Photograph of …" or "Lantern slide labelled …". Describe what is visible, not the caption. Quote slide labels and ship names. Say "in fog" or "in a storm" when the weather is the point. Keep to 125 characters.',
        subjects: PHOTO_SUBJECTS,
        items: finish(rng, 'KHM-GP', photos, PHOTO_SUBJECTS, 'jpg', (y) => (y < 1900 ? 'Public domain' : museumRights), 0.12, editors),
      },
      {
        slug: 'posters-and-charts',
        name: 'Posters and Harbour Charts',
        description: 'Colour-printed excursion and regatta posters and printed harbour charts, 1868–1929.',
        medium: 'print',
        altTextLanguage: 'en-GB',
        houseStyle: 'Posters: give the lettering first, in quotation marks, then the picture. Charts: give the title, then what the chart shows. Keep to 125 characters.',
        subjects: PRINT_SUBJECTS,
        items: finish(rng, 'KHM-PC', prints, PRINT_SUBJECTS, 'png', (y) => (y < 1900 ? 'Public domain' : museumRights), 0.15, editors),
      },
    ],
  };
}
