/**
 * The drawing program of one demo image. A scene is plain data: `render.ts` turns it into SVG.
 *
 * Coordinates are fractions of the picture area: `x` of its width, `y` of its height (0 = top).
 * Sizes are fractions of the picture height. Elements are drawn in the order given (back to front).
 */

export type SceneStyle = 'engraving' | 'photograph' | 'lithograph';
export type PhotoTone = 'sepia' | 'grey' | 'selenium';
export type Weather = 'fair' | 'cloudy' | 'storm' | 'fog';
export type SeaState = 'calm' | 'choppy' | 'rough';
export type Facing = 1 | -1;

export interface SailingShipElement {
  kind: 'sailing-ship';
  x: number;
  /** waterline */
  y: number;
  /** hull length */
  size: number;
  facing: Facing;
  masts: 1 | 2 | 3;
  rig: 'square' | 'fore-and-aft';
  /** degrees, positive leans the masts towards the bow */
  heel: number;
  /** painted on the hull, upper case */
  name?: string;
}

export interface SteamshipElement {
  kind: 'steamship';
  x: number;
  y: number;
  size: number;
  facing: Facing;
  funnels: 1 | 2;
  paddle: boolean;
  /** 0..1, length of the smoke trail */
  smoke: number;
  name?: string;
}

export interface RowingBoatElement {
  kind: 'rowing-boat';
  x: number;
  y: number;
  size: number;
  facing: Facing;
  rowers: 1 | 2;
}

export interface LighthouseElement {
  kind: 'lighthouse';
  x: number;
  /** foot of the tower */
  y: number;
  /** tower height including the lantern */
  size: number;
  bands: boolean;
  beams: boolean;
  cottage: boolean;
}

export interface PierElement {
  kind: 'pier';
  from: 'left' | 'right';
  /** how far the pier reaches into the picture, fraction of width */
  reach: number;
  /** waterline at the shore end and at the head */
  yNear: number;
  yFar: number;
  /** deck height above the water at the shore end and at the head */
  heightNear: number;
  heightFar: number;
  build: 'timber' | 'stone';
  lamps: boolean;
}

export interface CraneElement {
  kind: 'crane';
  x: number;
  y: number;
  /** overall height */
  size: number;
  facing: Facing;
  load: 'crate' | 'barrel' | 'sling';
}

export interface WorkerElement {
  kind: 'worker';
  x: number;
  /** feet */
  y: number;
  /** figure height */
  size: number;
  facing: Facing;
  pose: 'carry' | 'haul' | 'roll' | 'push' | 'mend';
}

export interface CargoElement {
  kind: 'cargo';
  x: number;
  y: number;
  size: number;
  type: 'barrel' | 'crate' | 'sacks';
}

export interface GullElement {
  kind: 'gull';
  x: number;
  y: number;
  /** wingspan */
  size: number;
  /** 0 = wings level, 1 = wings raised */
  flap: number;
}

export interface HeadlandElement {
  kind: 'headland';
  side: 'left' | 'right';
  /** fraction of width */
  width: number;
  /** height above the horizon */
  height: number;
}

export interface RockElement {
  kind: 'rock';
  x: number;
  y: number;
  /** width */
  size: number;
}

export interface QuayElement {
  kind: 'quay';
  /** the quay edge; the quay fills the picture below it */
  top: number;
  bollards: number[];
}

export interface SunElement {
  kind: 'sun';
  x: number;
  y: number;
  size: number;
  rays: boolean;
}

export type SceneElement =
  | SailingShipElement
  | SteamshipElement
  | RowingBoatElement
  | LighthouseElement
  | PierElement
  | CraneElement
  | WorkerElement
  | CargoElement
  | GullElement
  | HeadlandElement
  | RockElement
  | QuayElement
  | SunElement;

/** A landscape: sky, sea and what stands on them. Also used as the picture panel of a poster. */
export interface ViewPicture {
  /** fraction of the picture height */
  horizon: number;
  weather: Weather;
  sea: SeaState;
  elements: SceneElement[];
}

interface SceneBase {
  /** seeds the fine texture (wave strokes, grain, coastline) */
  seed: number;
  /** width / height of the whole image */
  aspect: number;
  /**
   * Every legible word drawn in the image, in reading order (ship names, engraved titles, labels,
   * poster lettering, chart titles and place names). Depth figures and the compass letter on
   * charts are not listed.
   */
  visibleText: string[];
}

export interface ViewScene extends SceneBase, ViewPicture {
  layout: 'view';
  style: 'engraving' | 'photograph';
  /** engraved title below the picture (engravings) */
  lettering?: string;
  /** photographs only */
  tone?: PhotoTone;
  /** photographs only: plain glass plate, or a lantern slide with a paper label */
  mount?: 'glass-plate' | 'lantern-slide';
  /** text of the lantern-slide label */
  label?: string;
}

export interface OrnamentScene extends SceneBase {
  layout: 'ornament';
  style: 'engraving';
  border: 'rope' | 'wave' | 'laurel' | 'shell';
  centre: 'anchor' | 'knot' | 'star' | 'shell';
}

export interface ChartScene extends SceneBase {
  layout: 'chart';
  style: 'engraving' | 'lithograph';
  title: string;
  subtitle: string;
  /** place name written on the land */
  town: string;
  /** side of the sheet the land occupies */
  coast: 'left' | 'right' | 'top' | 'bottom';
  compass: { x: number; y: number; size: number };
  /** light symbol on the coast */
  light: boolean;
  palette: number;
}

export interface PosterScene extends SceneBase {
  layout: 'poster';
  style: 'lithograph';
  palette: number;
  title: string;
  subtitle: string;
  footer: string;
  picture: ViewPicture;
}

export type SceneSpec = ViewScene | OrnamentScene | ChartScene | PosterScene;
