// The editor's tools, each a small state machine (idle → pointing → dragging → idle, plus placing for polygons and
// painting for the brush) with onPointerDown/Move/Up. Tools hold only their own gesture state; they show work in
// progress through the context (a draft document, an overlay) and change the scene only by executing commands.
import { SCENE_LIMITS, type ShapeDoc } from '../scene/schema';
import { shapeBounds, shapeCentroid, type Bounds } from '../scene/shapes';
import type { SolvedPose } from '../scene/pose';
import { type EditorDoc, type Group, type ItemRef, type AnyItem, findItem, makeItem, sameRef, toWholeCells } from './document';
import { addItem, setSection, updateItems, type Command } from './commands';
import {
  type Vec, type Handle, rectFromCorners, circleFromDrag, ellipseFromCorners, shapeIsTiny, translateShape, fitShape, rotateShape,
  hitTest, itemsInBox, handlesOf, handleAt, SPOUT_ARM_PER_SPEED, tidy,
} from './geometry';
import { traceMatte, type Mask } from './matte';
import { jumpWarning } from './key-jump';

export type ToolId = 'select' | 'pour' | 'spout' | 'wall' | 'prop' | 'drain' | 'tank';
export type ShapeMode = 'rect' | 'ellipse' | 'circle' | 'polygon' | 'brush';

/** The drawing modes each shape tool offers (the first is the default). */
export const SHAPE_MODES: Record<Exclude<ToolId, 'select' | 'tank'>, readonly ShapeMode[]> = {
  pour: ['rect', 'ellipse', 'polygon', 'brush'],
  spout: ['rect', 'circle'],
  wall: ['rect', 'circle', 'polygon'],
  prop: ['rect', 'circle', 'polygon'],
  drain: ['rect', 'circle', 'polygon'],
};

export const TOOL_GROUP: Record<Exclude<ToolId, 'select' | 'tank'>, Group> = { pour: 'pours', spout: 'spouts', wall: 'walls', prop: 'props', drain: 'drains' };

/** Guides a tool draws over the scene while it works (screen-only; never part of the document). */
export type Overlay =
  | { kind: 'shape'; shape: ShapeDoc }
  | { kind: 'polyline'; points: Vec[]; cursor: Vec | null }
  | { kind: 'band'; box: Bounds }
  | { kind: 'brush'; mask: Mask; metresPerPixel: number; cursor: Vec; radius: number }
  | { kind: 'cursor'; at: Vec; radius: number };

/** A pointer event in tank metres. */
export interface ToolPointer {
  /** Position in tank metres (y up), not snapped. */
  x: number;
  y: number;
  shift: boolean;
  alt: boolean;
  /** Click count (2 for a double click). */
  detail: number;
}

/** What a tool may read and do. */
export interface ToolContext {
  readonly doc: EditorDoc;
  readonly frame: number;
  readonly selection: readonly ItemRef[];
  /** Metres per screen pixel at the current zoom (hit tolerances are a few pixels). */
  readonly pixel: number;
  readonly shapeMode: ShapeMode;
  readonly brushRadius: number;
  /** The live preview's solved prop states at the current frame, as the view draws them (null: none shown). */
  readonly solvedProps: readonly SolvedPose[] | null;
  /** Snaps a point to the grid or cells when snapping is on. */
  snap(p: Vec): Vec;
  execute(command: Command): void;
  /** Asks the artist a yes/no question (a key change that makes a prop jump); true: go ahead. */
  confirm(question: string): boolean;
  select(refs: ItemRef[]): void;
  /** Shows a changed document while dragging (null: show the document itself). */
  setDraft(doc: EditorDoc | null): void;
  setOverlay(overlay: Overlay | null): void;
}

export interface Tool {
  readonly id: ToolId;
  /** The state's name, for tests and the status line. */
  readonly state: string;
  onPointerDown(ctx: ToolContext, p: ToolPointer): void;
  onPointerMove(ctx: ToolContext, p: ToolPointer): void;
  onPointerUp(ctx: ToolContext, p: ToolPointer): void;
  /** A key while the tool has focus; returns true when the tool used it. */
  onKey?(ctx: ToolContext, key: string): boolean;
  /** Drops any gesture in progress. */
  cancel(ctx: ToolContext): void;
}

const DRAG_PX = 4;
const pt = (p: ToolPointer): Vec => [p.x, p.y];
const far = (ctx: ToolContext, a: Vec, b: Vec) => Math.hypot(a[0] - b[0], a[1] - b[1]) > DRAG_PX * ctx.pixel;

// ── Select: pick, move, resize, rotate, drag keys and spout directions, box-select ───────────────────────────────

type SelectGesture = 'move' | 'resize' | 'rotate' | 'key' | 'direction' | 'band';
type SelectState =
  | { name: 'idle' }
  | { name: 'pointing'; start: Vec; gesture: SelectGesture; handle: Handle | null; hit: ItemRef | null; shift: boolean }
  | { name: 'dragging'; start: Vec; gesture: SelectGesture; handle: Handle | null; hit: ItemRef | null; shift: boolean; changes: { ref: ItemRef; next: AnyItem }[]; box: Bounds | null };

export class SelectTool implements Tool {
  readonly id = 'select' as const;
  private s: SelectState = { name: 'idle' };
  get state() { return this.s.name; }

  onPointerDown(ctx: ToolContext, p: ToolPointer) {
    const at = pt(p);
    if (ctx.selection.length === 1) {
      const item = findItem(ctx.doc, ctx.selection[0]);
      const h = item ? handleAt(handlesOf(item, ctx.pixel), p.x, p.y, 7 * ctx.pixel, ctx.frame) : null;
      if (h) {
        const gesture: SelectGesture = h.kind === 'corner' ? 'resize' : h.kind;
        this.s = { name: 'pointing', start: at, gesture, handle: h, hit: ctx.selection[0], shift: p.shift };
        return;
      }
    }
    const hit = hitTest(ctx.doc, p.x, p.y, ctx.frame, 4 * ctx.pixel, ctx.solvedProps);
    if (hit && !ctx.selection.some((r) => sameRef(r, hit)) && !p.shift) ctx.select([hit]);
    this.s = { name: 'pointing', start: at, gesture: hit ? 'move' : 'band', handle: null, hit, shift: p.shift };
  }

  onPointerMove(ctx: ToolContext, p: ToolPointer) {
    const s = this.s;
    if (s.name === 'idle') return;
    const at = pt(p);
    if (s.name === 'pointing') {
      if (!far(ctx, s.start, at)) return;
      this.s = { ...s, name: 'dragging', changes: [], box: null };
    }
    const d = this.s as Extract<SelectState, { name: 'dragging' }>;
    if (d.gesture === 'band') {
      d.box = { minX: Math.min(d.start[0], p.x), minY: Math.min(d.start[1], p.y), maxX: Math.max(d.start[0], p.x), maxY: Math.max(d.start[1], p.y) };
      ctx.setOverlay({ kind: 'band', box: d.box });
      return;
    }
    d.changes = this.changesFor(ctx, d, at, p);
    let draft = ctx.doc;
    for (const c of d.changes) draft = replaceIn(draft, c.ref, c.next);
    ctx.setDraft(draft);
  }

  onPointerUp(ctx: ToolContext, p: ToolPointer) {
    const s = this.s;
    this.s = { name: 'idle' };
    if (s.name === 'pointing') {
      // a click: select what is under the pointer (shift adds or removes it)
      if (s.gesture === 'band' || s.gesture === 'move') {
        if (!s.hit) { if (!s.shift) ctx.select([]); }
        else if (s.shift) {
          const has = ctx.selection.some((r) => sameRef(r, s.hit!));
          ctx.select(has ? ctx.selection.filter((r) => !sameRef(r, s.hit!)) : [...ctx.selection, s.hit]);
        } else ctx.select([s.hit]);
      }
      return;
    }
    if (s.name !== 'dragging') return;
    if (s.gesture === 'band') {
      ctx.setOverlay(null);
      const picked = s.box ? itemsInBox(ctx.doc, s.box) : [];
      ctx.select(s.shift ? [...ctx.selection, ...picked.filter((r) => !ctx.selection.some((q) => sameRef(q, r)))] : picked);
      return;
    }
    ctx.setDraft(null);
    const changes = this.changesFor(ctx, s, pt(p), p);
    if (!changes.length) return;
    if (s.gesture === 'key') {
      const before = findItem(ctx.doc, changes[0].ref), after = changes[0].next;
      const question = before && 'keys' in before && 'keys' in after ? jumpWarning(before, after, ctx.doc.timing.fps) : null;
      if (question && !ctx.confirm(question)) return;
    }
    ctx.execute(updateItems(changes, gestureLabel(s.gesture, changes)));
  }

  cancel(ctx: ToolContext) {
    this.s = { name: 'idle' };
    ctx.setDraft(null);
    ctx.setOverlay(null);
  }

  /** The changed items for the gesture with the pointer at `at`. */
  private changesFor(ctx: ToolContext, s: Extract<SelectState, { name: 'dragging' }>, at: Vec, p: ToolPointer): { ref: ItemRef; next: AnyItem }[] {
    const doc = ctx.doc;
    if (s.gesture === 'move') {
      const a = ctx.snap(s.start), b = ctx.snap(at);
      const dx = b[0] - a[0], dy = b[1] - a[1];
      if (dx === 0 && dy === 0) return [];
      return ctx.selection.flatMap((ref) => {
        const item = findItem(doc, ref);
        return item ? [{ ref, next: { ...item, shape: translateShape(item.shape, dx, dy) } as AnyItem }] : [];
      });
    }
    const ref = s.hit!;
    const item = findItem(doc, ref);
    if (!item || !s.handle) return [];
    const h = s.handle;
    switch (s.gesture) {
      case 'resize': {
        const b = shapeBounds(item.shape);
        const fixed: Vec = [[b.maxX, b.maxY], [b.minX, b.maxY], [b.minX, b.minY], [b.maxX, b.minY]][h.index] as Vec;
        const q = ctx.snap(at);
        const to = { minX: Math.min(fixed[0], q[0]), minY: Math.min(fixed[1], q[1]), maxX: Math.max(fixed[0], q[0]), maxY: Math.max(fixed[1], q[1]) };
        if (to.maxX - to.minX < 2 * ctx.pixel || to.maxY - to.minY < 2 * ctx.pixel) return [];
        return [{ ref, next: { ...item, shape: fitShape(item.shape, b, to) } as AnyItem }];
      }
      case 'rotate': {
        const c = shapeCentroid(item.shape);
        let deg = ((Math.atan2(at[1] - c[1], at[0] - c[0]) - Math.atan2(s.start[1] - c[1], s.start[0] - c[0])) * 180) / Math.PI;
        // free rotation (whole degrees); Shift snaps to 15° steps
        deg = p.shift ? Math.round(deg / 15) * 15 : Math.round(deg);
        if (deg === 0) return [];
        return [{ ref, next: { ...item, shape: rotateShape(item.shape, deg, c) } as AnyItem }];
      }
      case 'key': {
        if (!('keys' in item)) return [];
        const c = shapeCentroid(item.shape);
        const q = ctx.snap(at);
        const keys = item.keys.map((k, i) => (i === h.index ? { ...k, dx: tidy(q[0] - c[0]), dy: tidy(q[1] - c[1]) } : k));
        return [{ ref, next: { ...item, keys } }];
      }
      case 'direction': {
        if (!('velocity' in item)) return [];
        const c = shapeCentroid(item.shape);
        const velocity: [number, number] = [tidy((at[0] - c[0]) / SPOUT_ARM_PER_SPEED), tidy((at[1] - c[1]) / SPOUT_ARM_PER_SPEED)];
        return [{ ref, next: { ...item, velocity } as AnyItem }];
      }
      default: return [];
    }
  }
}

function gestureLabel(g: SelectGesture, changes: { ref: ItemRef }[]): string {
  const what = changes.length === 1 ? changes[0].ref.id : `${changes.length} items`;
  return { move: 'Move', resize: 'Resize', rotate: 'Rotate', key: 'Move key of', direction: 'Aim', band: 'Select' }[g] + ' ' + what;
}

function replaceIn(doc: EditorDoc, ref: ItemRef, next: AnyItem): EditorDoc {
  return { ...doc, [ref.group]: (doc[ref.group] as AnyItem[]).map((it) => (it.id === ref.id ? next : it)) };
}

// ── Shape tools: Pour, Spout, Wall, Prop, Drain ─────────────────────────────────────────────────────────────────

type ShapeState =
  | { name: 'idle' }
  | { name: 'pointing'; start: Vec }
  | { name: 'dragging'; start: Vec; shape: ShapeDoc }
  | { name: 'placing'; points: Vec[] }
  | { name: 'painting'; mask: Mask; metresPerPixel: number; last: Vec };

/** Size (in cells) of a shape placed by a click without a drag. */
export const CLICK_SHAPE_CELLS = 8;

export class ShapeTool implements Tool {
  private s: ShapeState = { name: 'idle' };
  constructor(readonly id: Exclude<ToolId, 'select' | 'tank'>) {}
  get state() { return this.s.name; }
  private get group(): Group { return TOOL_GROUP[this.id]; }

  onPointerDown(ctx: ToolContext, p: ToolPointer) {
    const at = ctx.snap(pt(p));
    const mode = ctx.shapeMode;
    if (mode === 'polygon') {
      const pts = this.s.name === 'placing' ? this.s.points : [];
      const closes = pts.length >= 3 && (Math.hypot(at[0] - pts[0][0], at[1] - pts[0][1]) <= 8 * ctx.pixel || p.detail >= 2);
      if (closes) { this.commit(ctx, { type: 'polygon', points: pts }); return; }
      const last = pts[pts.length - 1];
      const next = last && !far(ctx, last, at) ? pts : [...pts, at];
      this.s = { name: 'placing', points: next };
      ctx.setOverlay({ kind: 'polyline', points: next, cursor: at });
      return;
    }
    if (mode === 'brush') {
      const cell = ctx.doc.tank.cellSize;
      const mpp = Math.max(cell / 2, ctx.doc.tank.width / 1024, ctx.brushRadius / 6);
      const width = Math.ceil(ctx.doc.tank.width / mpp), height = Math.ceil(ctx.doc.tank.height / mpp);
      const mask: Mask = { width, height, data: new Uint8Array(width * height) };
      this.s = { name: 'painting', mask, metresPerPixel: mpp, last: pt(p) };
      stamp(mask, mpp, pt(p), pt(p), ctx.brushRadius);
      ctx.setOverlay({ kind: 'brush', mask, metresPerPixel: mpp, cursor: pt(p), radius: ctx.brushRadius });
      return;
    }
    this.s = { name: 'pointing', start: at };
  }

  onPointerMove(ctx: ToolContext, p: ToolPointer) {
    const s = this.s;
    if (s.name === 'idle') {
      if (ctx.shapeMode === 'brush') ctx.setOverlay({ kind: 'cursor', at: pt(p), radius: ctx.brushRadius });
      return;
    }
    if (s.name === 'placing') { ctx.setOverlay({ kind: 'polyline', points: s.points, cursor: ctx.snap(pt(p)) }); return; }
    if (s.name === 'painting') {
      stamp(s.mask, s.metresPerPixel, s.last, pt(p), ctx.brushRadius);
      s.last = pt(p);
      ctx.setOverlay({ kind: 'brush', mask: s.mask, metresPerPixel: s.metresPerPixel, cursor: pt(p), radius: ctx.brushRadius });
      return;
    }
    const at = ctx.snap(pt(p));
    if (s.name === 'pointing' && !far(ctx, s.start, at)) return;
    const shape = this.dragShape(ctx.shapeMode, s.start, at);
    this.s = { name: 'dragging', start: s.start, shape };
    ctx.setOverlay({ kind: 'shape', shape });
  }

  onPointerUp(ctx: ToolContext, p: ToolPointer) {
    const s = this.s;
    if (s.name === 'placing' || s.name === 'idle') return; // polygons finish on a click near the start, a double click or Enter
    if (s.name === 'painting') {
      stamp(s.mask, s.metresPerPixel, s.last, pt(p), ctx.brushRadius);
      const points = traceMatte(s.mask, { metresPerPixel: s.metresPerPixel, originX: 0, originY: 0, tolerancePx: 0.75, maxPoints: 300 });
      if (points && points.length >= 3) this.commit(ctx, { type: 'polygon', points });
      else this.cancel(ctx);
      return;
    }
    if (s.name === 'pointing') {
      // a click: a shape of CLICK_SHAPE_CELLS cells centred on the point
      const half = (CLICK_SHAPE_CELLS * ctx.doc.tank.cellSize) / 2;
      const c = s.start;
      this.commit(ctx, this.dragShape(ctx.shapeMode === 'circle' ? 'circle' : ctx.shapeMode === 'ellipse' ? 'ellipse' : 'rect',
        ctx.shapeMode === 'circle' ? c : [c[0] - half, c[1] - half], ctx.shapeMode === 'circle' ? [c[0] + half, c[1]] : [c[0] + half, c[1] + half]));
      return;
    }
    const shape = this.dragShape(ctx.shapeMode, s.start, ctx.snap(pt(p)));
    if (shapeIsTiny(shape, 2 * ctx.pixel)) { this.cancel(ctx); return; }
    this.commit(ctx, shape);
  }

  onKey(ctx: ToolContext, key: string): boolean {
    const s = this.s;
    if (s.name !== 'placing') return false;
    if (key === 'Enter' && s.points.length >= 3) { this.commit(ctx, { type: 'polygon', points: s.points }); return true; }
    if (key === 'Backspace') {
      const points = s.points.slice(0, -1);
      this.s = points.length ? { name: 'placing', points } : { name: 'idle' };
      ctx.setOverlay(points.length ? { kind: 'polyline', points, cursor: null } : null);
      return true;
    }
    if (key === 'Escape') { this.cancel(ctx); return true; }
    return false;
  }

  cancel(ctx: ToolContext) {
    this.s = { name: 'idle' };
    ctx.setOverlay(null);
  }

  private dragShape(mode: ShapeMode, a: Vec, b: Vec): ShapeDoc {
    if (mode === 'circle') return circleFromDrag(a, b);
    if (mode === 'ellipse') return ellipseFromCorners(a, b);
    return rectFromCorners(a, b);
  }

  private commit(ctx: ToolContext, shape: ShapeDoc) {
    this.s = { name: 'idle' };
    ctx.setOverlay(null);
    const item = makeItem(ctx.doc, this.group, shape);
    ctx.execute(addItem(this.group, item));
    ctx.select([{ group: this.group, id: item.id }]);
  }
}

/** Paints a disc of `radius` metres along the segment a–b into the mask (rows from the top). */
function stamp(mask: Mask, mpp: number, a: Vec, b: Vec, radius: number) {
  const steps = Math.max(1, Math.ceil(Math.hypot(b[0] - a[0], b[1] - a[1]) / (radius / 3)));
  const r = radius / mpp;
  for (let k = 0; k <= steps; k++) {
    const x = (a[0] + ((b[0] - a[0]) * k) / steps) / mpp;
    const y = mask.height - (a[1] + ((b[1] - a[1]) * k) / steps) / mpp;
    for (let j = Math.max(0, Math.floor(y - r)); j <= Math.min(mask.height - 1, Math.ceil(y + r)); j++) {
      for (let i = Math.max(0, Math.floor(x - r)); i <= Math.min(mask.width - 1, Math.ceil(x + r)); i++) {
        if ((i + 0.5 - x) ** 2 + (j + 0.5 - y) ** 2 <= r * r) mask.data[j * mask.width + i] = 1;
      }
    }
  }
}

// ── Tank: drag to size the tank from its lower-left corner (whole cells while Shift is held) ─────────────────────

/** Step a dragged tank side moves in, m (1 mm): a tank need not be a whole number of cells (scene tankCells). */
const TANK_DRAG_STEP = 1e-3;

/**
 * A tank side dragged to `length` m: to the millimetre, or to whole cells when the artist asks (Shift); never
 * fewer than 2 cells nor more than the scene's cells per side, so the dragged tank is always a valid scene.
 */
export function draggedTankLength(length: number, cellSize: number, wholeCells: boolean): number {
  const lo = 2 * cellSize, hi = SCENE_LIMITS.maxCellsPerSide * cellSize;
  const v = wholeCells ? toWholeCells(length, cellSize) : Number((Math.round(length / TANK_DRAG_STEP) * TANK_DRAG_STEP).toFixed(6));
  return v < lo ? lo : v > hi ? (wholeCells ? toWholeCells(hi, cellSize) : Number(hi.toFixed(6))) : v;
}

type TankState = { name: 'idle' } | { name: 'pointing'; start: Vec } | { name: 'dragging'; tank: EditorDoc['tank'] };

export class TankTool implements Tool {
  readonly id = 'tank' as const;
  private s: TankState = { name: 'idle' };
  get state() { return this.s.name; }

  onPointerDown(_ctx: ToolContext, p: ToolPointer) { this.s = { name: 'pointing', start: pt(p) }; }

  onPointerMove(ctx: ToolContext, p: ToolPointer) {
    if (this.s.name === 'idle') return;
    if (this.s.name === 'pointing' && !far(ctx, this.s.start, pt(p))) return;
    const h = ctx.doc.tank.cellSize;
    const tank = { ...ctx.doc.tank, width: draggedTankLength(p.x, h, p.shift), height: draggedTankLength(p.y, h, p.shift) };
    this.s = { name: 'dragging', tank };
    ctx.setDraft({ ...ctx.doc, tank });
  }

  onPointerUp(ctx: ToolContext) {
    const s = this.s;
    this.s = { name: 'idle' };
    ctx.setDraft(null);
    if (s.name === 'dragging' && (s.tank.width !== ctx.doc.tank.width || s.tank.height !== ctx.doc.tank.height)) {
      ctx.execute(setSection('tank', s.tank, `Resize tank to ${s.tank.width} × ${s.tank.height} m`));
    }
  }

  cancel(ctx: ToolContext) { this.s = { name: 'idle' }; ctx.setDraft(null); }
}

export function createTool(id: ToolId): Tool {
  if (id === 'select') return new SelectTool();
  if (id === 'tank') return new TankTool();
  return new ShapeTool(id);
}
