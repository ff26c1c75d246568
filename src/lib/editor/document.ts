// The editor's document: a parsed scene (version 2, every default filled in), the groups of items it holds,
// and the starting scene for a shot (sized to the plate at its scale, or a 1.6 m × 0.9 m default).
import { DEFAULT_LIQUID, cellFit, type Scene, type ShapeDoc } from '../scene/schema';
import { rateInfo, isFrameRate } from '../timecode';

/** The document the editor edits: exactly the scene format, defaults filled in. */
export type EditorDoc = Scene;

export const GROUPS = ['pours', 'spouts', 'walls', 'props', 'drains'] as const;
export type Group = (typeof GROUPS)[number];

/** Our product word for an item of each group (DEVELOPERS.md). */
export const GROUP_LABEL: Record<Group, string> = { pours: 'Standing liquid', spouts: 'Spout', walls: 'Wall', props: 'Prop', drains: 'Drain' };

export type Item<G extends Group = Group> = EditorDoc[G][number];
export type AnyItem = Item<Group>;

/** A reference to one item of the document: its group and id (ids are unique across the scene). */
export interface ItemRef { group: Group; id: string }

export const sameRef = (a: ItemRef, b: ItemRef) => a.group === b.group && a.id === b.id;

/** The item a reference points at, or undefined. */
export function findItem(doc: EditorDoc, ref: ItemRef): AnyItem | undefined {
  return (doc[ref.group] as AnyItem[]).find((it) => it.id === ref.id);
}

/** Every item of the document with its reference, in drawing order (pours, spouts, walls, props, drains). */
export function allItems(doc: EditorDoc): { ref: ItemRef; item: AnyItem }[] {
  const out: { ref: ItemRef; item: AnyItem }[] = [];
  for (const group of GROUPS) for (const item of doc[group] as AnyItem[]) out.push({ ref: { group, id: item.id }, item });
  return out;
}

/** A fresh id for a new item of the group: "standing-liquid-1", "spout-2", … (unique across the whole scene). */
export function nextId(doc: EditorDoc, group: Group): string {
  const base = GROUP_LABEL[group].toLowerCase().replace(/\s+/g, '-');
  const taken = new Set(allItems(doc).map((e) => e.ref.id));
  for (let n = 1; ; n++) if (!taken.has(`${base}-${n}`)) return `${base}-${n}`;
}

/** A deep copy of a JSON-shaped value (documents hold only numbers, strings, booleans, arrays and objects). */
export function clone<T>(value: T): T {
  return structuredClone(value);
}

/** What the editor needs to know of a shot to start a scene. */
export interface ShotFacts {
  firstFrame: number;
  lastFrame: number;
  /** Rate id, e.g. '25' or '29.97df'. */
  frameRate: string;
  plateWidth: number;
  plateHeight: number;
  /** Metres per plate pixel, when the plate's scale has been set. */
  metresPerPixel: number | null;
}

/** Frames per second (real rate, e.g. 30000/1001 for 29.97) of a rate id; 24 for an unknown id. */
export function fpsOf(rateId: string): number {
  return isFrameRate(rateId) ? rateInfo(rateId).fps : 24;
}

/** Round cell sizes (m) the editor suggests for a new scene (niceCellSize); any size in range may be typed. */
export const CELL_SIZES = [0.002, 0.0025, 0.004, 0.005, 0.008, 0.01, 0.0125, 0.02, 0.025, 0.04, 0.05, 0.08, 0.1, 0.125, 0.2, 0.25] as const;

/** The offered cell size closest (in ratio) to `target` metres. */
export function niceCellSize(target: number): number {
  let best: number = CELL_SIZES[0];
  for (const c of CELL_SIZES) if (Math.abs(Math.log(c / target)) < Math.abs(Math.log(best / target))) best = c;
  return best;
}

/** Rounds a length (m) to a whole number (at least 2) of cells; returns metres. */
export function toWholeCells(length: number, cellSize: number): number {
  const n = Math.max(2, Math.round(length / cellSize));
  return Number((n * cellSize).toFixed(10));
}

/**
 * The tank with a new cell size: width and height stay as the artist typed them (the solver's grid covers a tank
 * that is not a whole number of cells, tankCells), so changing the cell size never moves the tank's walls.
 */
export function withCellSize<T extends { width: number; height: number; cellSize: number }>(tank: T, cellSize: number): T {
  return { ...tank, cellSize };
}

/** The Tank panel's line for one side: "120 cells" or "120 cells, the last 0.4 of one partly inside". */
export function cellsNote(length: number, cellSize: number): string {
  const fit = cellFit(length, cellSize);
  if (fit.cover === fit.whole) return `${fit.cover} cells.`;
  const part = length / cellSize - fit.whole;
  return `${fit.cover} cells; the last is ${part.toFixed(2)} of a cell inside the tank (solid on a closed side).`;
}

export const DEFAULT_TANK = { width: 1.6, height: 0.9 } as const;
/** Cells across the tank's width the starting scene aims for (fine enough to read a splash, quick to preview). */
export const START_CELLS_ACROSS = 128;

/**
 * The starting scene of a shot with no version yet: the tank's lower-left corner on the plate's bottom-left pixel,
 * width = plate width × metresPerPixel and height = plate height × metresPerPixel rounded to whole cells (or
 * 1.6 m × 0.9 m without a scale), the shot's frame range and rate, default physics, nothing in it.
 */
export function startingScene(shot: ShotFacts): EditorDoc {
  const scaled = shot.metresPerPixel && shot.metresPerPixel > 0 && shot.plateWidth > 0 && shot.plateHeight > 0;
  const w = scaled ? shot.plateWidth * shot.metresPerPixel! : DEFAULT_TANK.width;
  const h = scaled ? shot.plateHeight * shot.metresPerPixel! : DEFAULT_TANK.height;
  const cellSize = niceCellSize(w / START_CELLS_ACROSS);
  return {
    version: 2,
    liquids: [{ ...DEFAULT_LIQUID }],
    tank: { width: toWholeCells(w, cellSize), height: toWholeCells(h, cellSize), cellSize, sides: { left: true, right: true, bottom: true, top: false } },
    timing: { fps: fpsOf(shot.frameRate), startFrame: shot.firstFrame, endFrame: Math.max(shot.firstFrame, shot.lastFrame), substeps: 4 },
    physics: {
      gravity: [0, -9.81], flipRatio: 0.9, pressureIterations: 60, overRelaxation: 1.9, separationIterations: 2, driftCorrection: 1,
      particlesPerCell: 4, particleRadius: 0.3, cfl: 1, seed: 1, pressureSolver: 'pcg-mic0', pressureTolerance: 1e-2,
    },
    pours: [], spouts: [], walls: [], props: [], drains: [],
  };
}

/** The shape of a newly made item with the given shape (defaults for the group's other fields). */
export function makeItem(doc: EditorDoc, group: Group, shape: ShapeDoc, id = nextId(doc, group)): AnyItem {
  const t = doc.timing;
  switch (group) {
    case 'pours': return { id, liquid: doc.liquids[0].id, shape, velocity: [0, 0] };
    case 'spouts': return { id, liquid: doc.liquids[0].id, shape, velocity: [1.5, 0], startFrame: t.startFrame, endFrame: Math.min(t.endFrame, t.startFrame + Math.round(t.fps)) };
    case 'props': return { id, shape, motion: 'keyed', keys: [{ frame: t.startFrame, dx: 0, dy: 0, angle: 0 }] };
    default: return { id, shape };
  }
}
