/**
 * Composes harbour pictures from a wish list of subjects: places the structures, vessels, people
 * and birds so each one is visible, with seeded variation in horizon, scale and position.
 */
import { type Rng, chance, int, pick, range } from './prng.ts';
import type { Facing, LighthouseElement, SceneElement, ViewPicture, Weather } from './scene.ts';

/** things a picture can be asked to show; each maps to one subject key */
export type Feature =
  | 'sailing-ship'
  | 'steamship'
  | 'rowing-boat'
  | 'lighthouse'
  | 'pier'
  | 'crane'
  | 'people-at-work'
  | 'seabirds'
  | 'storm'
  | 'fog'
  | 'sun';

export const VESSELS: Feature[] = ['sailing-ship', 'steamship', 'rowing-boat'];

export interface ComposeRequest {
  features: Set<Feature>;
  primary: Feature;
  /** picture width / height */
  aspect: number;
  /** ship names to paint on large hulls, taken in turn */
  names: { sailing: string[]; steam: string[] };
  /** chance that a large hull carries its name */
  nameChance: number;
  /** posters: a simpler, bolder arrangement */
  poster?: boolean;
}

export interface Composition {
  picture: ViewPicture;
  /** where the lighthouse stands, for captions */
  lightSite?: 'pier' | 'headland' | 'rock';
  shipNames: string[];
}

interface Placed {
  z: number;
  el: SceneElement;
}

/** Features a picture shows, read back from its elements (the source of an item's truth). */
export function featuresOf(picture: ViewPicture): Set<Feature> {
  const out = new Set<Feature>();
  for (const el of picture.elements) {
    if (el.kind === 'sailing-ship') out.add('sailing-ship');
    else if (el.kind === 'steamship') out.add('steamship');
    else if (el.kind === 'rowing-boat') out.add('rowing-boat');
    else if (el.kind === 'lighthouse') out.add('lighthouse');
    else if (el.kind === 'pier') out.add('pier');
    else if (el.kind === 'crane') out.add('crane');
    else if (el.kind === 'worker') out.add('people-at-work');
    else if (el.kind === 'gull') out.add('seabirds');
    else if (el.kind === 'sun') out.add('sun');
  }
  if (picture.weather === 'storm') out.add('storm');
  if (picture.weather === 'fog') out.add('fog');
  return out;
}

export function compose(rng: Rng, req: ComposeRequest): Composition {
  const want = req.features;
  // in a storm or fog picture the vessel or light that braves it is drawn large
  const lead =
    req.primary === 'storm' || req.primary === 'fog' ? ([...want].find((f) => f !== 'storm' && f !== 'fog' && f !== 'seabirds') ?? req.primary) : req.primary;
  const isPrimary = (f: Feature) => lead === f;
  const weather: Weather = want.has('storm') ? 'storm' : want.has('fog') ? 'fog' : req.poster ? 'fair' : pick(rng, ['fair', 'fair', 'cloudy'] as const);
  const sea = weather === 'storm' ? 'rough' : pick(rng, ['calm', 'choppy', 'calm'] as const);
  const quay = want.has('crane') || want.has('people-at-work');
  const horizon = quay ? range(rng, 0.4, 0.5) : req.poster ? range(rng, 0.5, 0.6) : range(rng, 0.48, 0.62);
  const quayTop = quay ? range(rng, 0.68, 0.78) : 1;
  const depthY = (d: number) => horizon + d * (quayTop - horizon);
  const A = req.aspect;
  const placed: Placed[] = [];
  const occupied: Array<[number, number]> = [];
  const names = { sailing: [...req.names.sailing], steam: [...req.names.steam] };
  const shipNames: string[] = [];

  /** choose a centre x for something `half` wide (fraction of width) where little else stands */
  const placeX = (half: number, lo = 0.04, hi = 0.96): number => {
    const min = lo + half;
    const max = hi - half;
    if (max <= min) return (lo + hi) / 2;
    let best = (min + max) / 2;
    let bestScore = Number.POSITIVE_INFINITY;
    for (let i = 0; i < 24; i++) {
      const x = range(rng, min, max);
      let score = 0;
      for (const [a, b] of occupied) score += Math.max(0, Math.min(b, x + half) - Math.max(a, x - half));
      score += rng() * 0.01;
      if (score < bestScore) {
        bestScore = score;
        best = x;
      }
    }
    occupied.push([best - half, best + half]);
    return best;
  };

  let lightSite: Composition['lightSite'];
  let pierSide: 'left' | 'right' | undefined;
  let pierEnd: { x: number; y: number } | undefined;
  let heightOfPierHead = 0;

  if (want.has('pier')) {
    pierSide = chance(rng, 0.5) ? 'left' : 'right';
    const reach = isPrimary('pier') ? range(rng, 0.58, 0.8) : range(rng, 0.38, 0.6);
    const yNear = depthY(isPrimary('pier') ? range(rng, 0.55, 0.8) : range(rng, 0.4, 0.7));
    const yFar = depthY(range(rng, 0.1, 0.25));
    const heightNear = isPrimary('pier') ? range(rng, 0.13, 0.2) : range(rng, 0.08, 0.13);
    const heightFar = heightNear * range(rng, 0.4, 0.55);
    placed.push({
      z: yFar,
      el: { kind: 'pier', from: pierSide, reach, yNear, yFar, heightNear, heightFar, build: chance(rng, 0.65) ? 'timber' : 'stone', lamps: chance(rng, 0.55) },
    });
    pierEnd = { x: pierSide === 'left' ? reach : 1 - reach, y: yFar - heightFar };
    heightOfPierHead = heightFar;
    if (pierSide === 'left') occupied.push([0, reach * 0.75]);
    else occupied.push([1 - reach * 0.75, 1]);
  }

  if (want.has('lighthouse')) {
    const big = isPrimary('lighthouse');
    const beams = weather === 'storm' || weather === 'fog' ? chance(rng, 0.85) : chance(rng, 0.55);
    const bands = chance(rng, 0.5);
    const site = pierEnd && chance(rng, 0.45) ? 'pier' : chance(rng, 0.6) ? 'headland' : 'rock';
    lightSite = site;
    let light: LighthouseElement;
    if (site === 'pier' && pierEnd) {
      const size = Math.min(big ? range(rng, 0.3, 0.4) : range(rng, 0.18, 0.26), pierEnd.y - 0.05);
      light = { kind: 'lighthouse', x: pierEnd.x + (pierSide === 'left' ? -0.02 : 0.02), y: pierEnd.y, size, bands, beams, cottage: false };
      placed.push({ z: pierEnd.y + heightOfPierHead + 0.0005, el: light });
    } else if (site === 'headland') {
      const side = pierSide === 'left' ? 'right' : pierSide === 'right' ? 'left' : chance(rng, 0.5) ? 'left' : 'right';
      const width = range(rng, 0.28, 0.42);
      const height = range(rng, 0.08, 0.16);
      const t = 0.42;
      const xFrac = side === 'left' ? width * t : 1 - width * t;
      const footY = horizon - height * (1 - 0.05 - t * 0.2) + 0.012;
      const size = Math.min(big ? range(rng, 0.42, 0.55) : range(rng, 0.2, 0.3), footY - 0.05);
      placed.push({ z: horizon - 0.5, el: { kind: 'headland', side, width, height } });
      light = { kind: 'lighthouse', x: xFrac, y: footY, size, bands, beams, cottage: chance(rng, 0.5) };
      placed.push({ z: horizon - 0.49, el: light });
      occupied.push(side === 'left' ? [0, width * 0.8] : [1 - width * 0.8, 1]);
    } else {
      const y = depthY(big ? range(rng, 0.1, 0.3) : range(rng, 0.02, 0.15));
      const size = Math.min(big ? range(rng, 0.42, 0.55) : range(rng, 0.2, 0.3), y - 0.06);
      const rockW = size * 0.55;
      const x = placeX((rockW * 0.6) / A, 0.1, 0.9);
      placed.push({ z: y - 0.002, el: { kind: 'rock', x, y: y + 0.01, size: rockW } });
      light = { kind: 'lighthouse', x, y: y - rockW * 0.1, size, bands, beams, cottage: false };
      placed.push({ z: y - 0.001, el: light });
    }
  }

  const nameFor = (list: string[], size: number, min: number): string | undefined => {
    if (size < min || !chance(rng, req.nameChance)) return undefined;
    const n = list.shift();
    if (n) shipNames.push(n);
    return n;
  };

  const facing = (): Facing => (chance(rng, 0.5) ? 1 : -1);
  const waterLimit = quay ? 0.55 : 0.95;

  const placeSailing = () => {
    const copies = isPrimary('sailing-ship') && !req.poster && chance(rng, 0.3) ? 2 : req.poster && chance(rng, 0.6) ? 2 : 1;
    for (let i = 0; i < copies; i++) {
      const big = isPrimary('sailing-ship') && i === 0;
      const y = depthY(big ? range(rng, 0.45, waterLimit) : range(rng, 0.08, 0.35));
      let size = big ? range(rng, 0.5, 0.72) : range(rng, 0.2, 0.34);
      size = Math.min(size, (y - 0.04) / 0.9);
      const masts = pick(rng, [1, 2, 2, 3, 3, 3] as const);
      const rig = masts === 1 ? 'fore-and-aft' : masts === 2 ? (chance(rng, 0.5) ? 'fore-and-aft' : 'square') : 'square';
      const x = placeX((size * 0.62) / A);
      const name = nameFor(names.sailing, size, 0.42);
      placed.push({
        z: y,
        el: { kind: 'sailing-ship', x, y, size, facing: facing(), masts, rig, heel: weather === 'storm' ? range(rng, -7, 7) : 0, ...(name ? { name } : {}) },
      });
    }
  };
  const placeSteam = () => {
    const big = isPrimary('steamship');
    const y = depthY(big ? range(rng, 0.45, waterLimit) : range(rng, 0.1, 0.4));
    let size = big ? range(rng, 0.62, 0.85) : range(rng, 0.26, 0.4);
    size = Math.min(size, (y - 0.06) / 0.5);
    const x = placeX((size * 0.55) / A);
    const name = nameFor(names.steam, size, 0.5);
    placed.push({
      z: y,
      el: { kind: 'steamship', x, y, size, facing: facing(), funnels: chance(rng, 0.3) ? 2 : 1, paddle: chance(rng, 0.3), smoke: range(rng, 0.3, 1), ...(name ? { name } : {}) },
    });
  };
  const placeRowing = () => {
    const big = isPrimary('rowing-boat');
    const y = depthY(big ? range(rng, 0.65, quay ? 0.6 : 0.95) : range(rng, 0.35, quay ? 0.55 : 0.8));
    const size = big ? range(rng, 0.32, 0.46) : range(rng, 0.15, 0.22);
    const x = placeX((size * 0.6) / A);
    placed.push({ z: y, el: { kind: 'rowing-boat', x, y, size, facing: facing(), rowers: chance(rng, 0.55) ? 2 : 1 } });
  };
  // the main vessel is placed first, so it gets the clearest water
  const vesselOrder = [...VESSELS].sort((a, b) => (a === lead ? -1 : b === lead ? 1 : 0));
  for (const v of vesselOrder) {
    if (!want.has(v)) continue;
    if (v === 'sailing-ship') placeSailing();
    else if (v === 'steamship') placeSteam();
    else placeRowing();
  }

  if (quay) {
    const bollards = Array.from({ length: int(rng, 1, 3) }, () => range(rng, 0.08, 0.92));
    placed.push({ z: quayTop, el: { kind: 'quay', top: quayTop, bollards } });
    const band: Array<[number, number]> = [];
    const claim = (x: number, half: number) => band.push([x - half, x + half]);
    const free = (half: number, lo = 0.05, hi = 0.95): number => {
      let best = 0.5;
      let bestScore = Number.POSITIVE_INFINITY;
      for (let i = 0; i < 24; i++) {
        const x = range(rng, lo + half, Math.max(lo + half, hi - half));
        let score = 0;
        for (const [a, b] of band) score += Math.max(0, Math.min(b, x + half) - Math.max(a, x - half));
        if (score + rng() * 0.01 < bestScore) {
          bestScore = score;
          best = x;
        }
      }
      claim(best, half);
      return best;
    };
    if (want.has('crane')) {
      const left = chance(rng, 0.5);
      const y = quayTop + range(rng, 0.03, 0.08);
      const size = Math.min(isPrimary('crane') ? range(rng, 0.5, 0.62) : range(rng, 0.36, 0.48), y - 0.06);
      const x = left ? range(rng, 0.1, 0.22) : range(rng, 0.78, 0.9);
      claim(x, (size * 0.2) / A);
      placed.push({ z: y, el: { kind: 'crane', x, y, size, facing: left ? 1 : -1, load: pick(rng, ['crate', 'barrel', 'sling'] as const) } });
    }
    if (want.has('people-at-work')) {
      const count = isPrimary('people-at-work') ? int(rng, 2, 3) : int(rng, 2, 4);
      for (let i = 0; i < count; i++) {
        const y = quayTop + range(rng, 0.12, 0.96 - quayTop);
        const depth = (y - quayTop) / (1 - quayTop);
        const size = (isPrimary('people-at-work') ? range(rng, 0.26, 0.34) : range(rng, 0.17, 0.23)) * (0.75 + depth * 0.4);
        const x = free((size * 0.45) / A);
        const pose = pick(rng, ['carry', 'haul', 'roll', 'push', 'mend'] as const);
        placed.push({ z: y, el: { kind: 'worker', x, y, size: Math.min(size, y - quayTop + 0.2), facing: facing(), pose } });
      }
      for (let i = 0; i < int(rng, 1, 2); i++) {
        const y = quayTop + range(rng, 0.06, 0.96 - quayTop);
        const size = range(rng, 0.05, 0.09);
        placed.push({ z: y - 0.0005, el: { kind: 'cargo', x: free((size * 0.6) / A), y, size, type: pick(rng, ['barrel', 'crate', 'sacks'] as const) } });
      }
    } else {
      const y = quayTop + range(rng, 0.08, 0.2);
      placed.push({ z: y, el: { kind: 'cargo', x: free(0.05), y, size: range(rng, 0.06, 0.1), type: pick(rng, ['barrel', 'crate', 'sacks'] as const) } });
    }
  }

  if (want.has('sun')) {
    const x = chance(rng, 0.5) ? range(rng, 0.15, 0.35) : range(rng, 0.65, 0.85);
    placed.push({ z: -10, el: { kind: 'sun', x, y: range(rng, 0.14, Math.max(0.16, horizon - 0.2)), size: range(rng, 0.1, 0.16), rays: true } });
  }

  if (want.has('seabirds')) {
    const n = isPrimary('seabirds') ? int(rng, 5, 9) : int(rng, 3, 7);
    for (let i = 0; i < n; i++) {
      placed.push({
        z: 10 + i,
        el: {
          kind: 'gull',
          x: range(rng, 0.06, 0.94),
          y: range(rng, 0.06, Math.max(0.1, horizon - 0.1)),
          size: req.poster ? range(rng, 0.05, 0.08) : range(rng, 0.045, 0.085),
          flap: rng(),
        },
      });
    }
  }

  placed.sort((a, b) => a.z - b.z);
  return { picture: { horizon, weather, sea, elements: placed.map((p) => p.el) }, ...(lightSite ? { lightSite } : {}), shipNames };
}
