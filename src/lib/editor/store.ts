// The editor's state outside React and pixi: the undo history (the document), the selection, the active tool and its
// options, the current shot frame, snapping, and the draft/overlay tools show while dragging. Views subscribe and
// read `snapshot` (a new object after every change, for React's useSyncExternalStore).
import { History } from './history';
import { batch, removeItems, addItem, updateItem, type Command } from './commands';
import { type EditorDoc, type ItemRef, type AnyItem, type Group, findItem, nextId, clone, sameRef } from './document';
import { createTool, SHAPE_MODES, type Overlay, type ShapeMode, type Tool, type ToolContext, type ToolId, type ToolPointer } from './tools';
import { snapValue, translateShape, type Vec } from './geometry';
import type { SolvedPose } from '../scene/pose';

export type SnapMode = 'off' | 'grid' | 'cells';

export interface EditorSnapshot {
  doc: EditorDoc;
  /** What to draw: the draft while a tool drags, else the document. */
  shown: EditorDoc;
  overlay: Overlay | null;
  selection: readonly ItemRef[];
  tool: ToolId;
  toolState: string;
  shapeModes: Record<string, ShapeMode>;
  brushRadius: number;
  frame: number;
  snap: SnapMode;
  canUndo: boolean;
  canRedo: boolean;
  undoLabel: string | null;
  redoLabel: string | null;
  revision: number;
  /** Last action's message for the status line. */
  status: string;
}

export class EditorStore {
  readonly history: History;
  private tools = new Map<ToolId, Tool>();
  private listeners = new Set<() => void>();
  private state: Omit<EditorSnapshot, 'doc' | 'shown' | 'canUndo' | 'canRedo' | 'undoLabel' | 'redoLabel' | 'revision' | 'toolState'>;
  private draft: EditorDoc | null = null;
  snapshot!: EditorSnapshot;
  /** Metres per screen pixel, set by the view at each zoom. */
  pixel = 0.002;
  /** The metres grid's minor step, set by the view at each zoom (snapping to the grid uses it). */
  gridStep = 0.1;
  /**
   * The live preview's solved prop states at a frame when the view draws them (set by the editor, which owns the
   * preview), so the Pick tool hits a free prop where it is shown.
   */
  solvedPropsAt: (frame: number) => readonly SolvedPose[] | null = () => null;
  /** Asks the artist a yes/no question (the editor sets window.confirm); true: go ahead. */
  confirm: (question: string) => boolean = () => true;

  constructor(doc: EditorDoc) {
    this.history = new History(doc);
    this.state = {
      overlay: null, selection: [], tool: 'select', frame: doc.timing.startFrame, snap: 'grid', brushRadius: 0.03, status: '',
      shapeModes: Object.fromEntries(Object.entries(SHAPE_MODES).map(([k, v]) => [k, v[0]])),
    };
    this.publish();
  }

  subscribe = (fn: () => void) => { this.listeners.add(fn); return () => { this.listeners.delete(fn); }; };
  getSnapshot = () => this.snapshot;

  private publish() {
    const h = this.history;
    this.snapshot = {
      ...this.state, doc: h.doc, shown: this.draft ?? h.doc, canUndo: h.canUndo, canRedo: h.canRedo, undoLabel: h.undoLabel,
      redoLabel: h.redoLabel, revision: h.revision, toolState: this.tool().state,
    };
    for (const fn of this.listeners) fn();
  }

  private set(patch: Partial<typeof this.state>) { this.state = { ...this.state, ...patch }; this.publish(); }

  get doc(): EditorDoc { return this.history.doc; }

  tool(): Tool {
    let t = this.tools.get(this.state.tool);
    if (!t) { t = createTool(this.state.tool); this.tools.set(this.state.tool, t); }
    return t;
  }

  // ── document changes ──
  execute(command: Command) {
    this.history.execute(command);
    this.state = { ...this.state, selection: this.state.selection.filter((r) => findItem(this.history.doc, r)), status: command.label };
    this.publish();
  }
  undo() { const c = this.history.undo(); this.afterHistory(c ? `Undid: ${c.label}` : 'Nothing to undo'); }
  redo() { const c = this.history.redo(); this.afterHistory(c ? `Redid: ${c.label}` : 'Nothing to redo'); }
  private afterHistory(status: string) {
    this.tool().cancel(this.context());
    this.draft = null;
    this.state = { ...this.state, selection: this.state.selection.filter((r) => findItem(this.history.doc, r)), status };
    this.publish();
  }

  deleteSelection() {
    if (!this.state.selection.length) return;
    this.execute(removeItems(this.state.selection));
  }

  /** Copies the selected items a few cells to the right and up, with new ids, and selects the copies. */
  duplicateSelection() {
    const sel = this.state.selection;
    if (!sel.length) return;
    const offset = 4 * this.doc.tank.cellSize;
    let doc = this.doc;
    const cmds: Command[] = [];
    const copies: ItemRef[] = [];
    for (const ref of sel) {
      const item = findItem(doc, ref);
      if (!item) continue;
      const id = nextId(doc, ref.group);
      const copy = { ...clone(item), id, shape: translateShape(item.shape, offset, offset) } as AnyItem;
      const c = addItem(ref.group, copy);
      doc = c.apply(doc);
      cmds.push(c);
      copies.push({ group: ref.group, id });
    }
    this.execute(batch(copies.length === 1 ? `Duplicate ${sel[0].id}` : `Duplicate ${copies.length} items`, cmds));
    this.select(copies);
  }

  /** Replaces one item (from the inspector). */
  updateItem(ref: ItemRef, next: AnyItem, label?: string) {
    this.execute(updateItem(ref, next, label));
    if (ref.id !== next.id) this.select(this.state.selection.map((r) => (sameRef(r, ref) ? { group: r.group, id: next.id } : r)));
  }

  // ── UI state ──
  select(refs: ItemRef[]) { this.set({ selection: refs }); }
  setTool(tool: ToolId) {
    this.tool().cancel(this.context());
    this.draft = null;
    this.set({ tool, overlay: null });
  }
  setShapeMode(tool: ToolId, mode: ShapeMode) { this.tool().cancel(this.context()); this.set({ shapeModes: { ...this.state.shapeModes, [tool]: mode } }); }
  setBrushRadius(r: number) { this.set({ brushRadius: r }); }
  setFrame(frame: number) {
    const t = this.doc.timing;
    this.set({ frame: Math.max(t.startFrame, Math.min(t.endFrame, Math.round(frame))) });
  }
  setSnap(snap: SnapMode) { this.set({ snap }); }
  setStatus(status: string) { this.set({ status }); }

  snapPoint(p: Vec): Vec {
    const step = this.state.snap === 'grid' ? this.gridStep : this.state.snap === 'cells' ? this.doc.tank.cellSize : 0;
    return [snapValue(p[0], step), snapValue(p[1], step)];
  }

  // ── pointer input for the active tool ──
  context(): ToolContext {
    const store = this;
    return {
      get doc() { return store.doc; },
      get frame() { return store.state.frame; },
      get selection() { return store.state.selection; },
      get pixel() { return store.pixel; },
      get shapeMode() { return store.state.shapeModes[store.state.tool] ?? 'rect'; },
      get brushRadius() { return store.state.brushRadius; },
      get solvedProps() { return store.solvedPropsAt(store.state.frame); },
      snap: (p) => store.snapPoint(p),
      execute: (c) => store.execute(c),
      confirm: (q) => store.confirm(q),
      select: (refs) => store.select(refs),
      setDraft: (d) => { store.draft = d; store.publish(); },
      setOverlay: (o) => store.set({ overlay: o }),
    };
  }
  pointerDown(p: ToolPointer) { this.tool().onPointerDown(this.context(), p); this.publish(); }
  pointerMove(p: ToolPointer) { this.tool().onPointerMove(this.context(), p); }
  pointerUp(p: ToolPointer) { this.tool().onPointerUp(this.context(), p); this.publish(); }
  /** A key for the active tool (polygon Enter/Backspace/Escape); true when used. */
  toolKey(key: string): boolean {
    const used = this.tool().onKey?.(this.context(), key) ?? false;
    if (used) this.publish();
    return used;
  }
  cancelTool() { this.tool().cancel(this.context()); this.draft = null; this.publish(); }

  selectedItem(): { ref: ItemRef; item: AnyItem } | null {
    if (this.state.selection.length !== 1) return null;
    const ref = this.state.selection[0];
    const item = findItem(this.doc, ref);
    return item ? { ref, item } : null;
  }
}

/** Editor actions reachable from the keyboard. */
export type Action =
  | 'undo' | 'redo' | 'delete' | 'duplicate' | 'help' | 'play' | 'restart' | 'frame-back' | 'frame-forward' | 'frames-back' | 'frames-forward'
  | 'snap' | 'fit' | 'escape' | 'save' | `tool:${ToolId}`;

/** Tidemark's own keyboard map, listed in the help overlay. */
export const SHORTCUTS: readonly { keys: string; action: Action; what: string }[] = [
  { keys: '1', action: 'tool:select', what: 'Pick tool: select, move, resize, rotate, drag keys' },
  { keys: '2', action: 'tool:pour', what: 'Standing liquid: liquid in the tank at the first frame' },
  { keys: '3', action: 'tool:spout', what: 'Spout: emits liquid over a frame range' },
  { keys: '4', action: 'tool:wall', what: 'Wall: a solid that stays put' },
  { keys: '5', action: 'tool:prop', what: 'Prop: a solid that moves on keys' },
  { keys: '6', action: 'tool:drain', what: 'Drain: removes liquid' },
  { keys: '7', action: 'tool:tank', what: 'Tank: drag to size the tank' },
  { keys: 'Ctrl+Z', action: 'undo', what: 'Undo' },
  { keys: 'Ctrl+Shift+Z  or  Ctrl+Y', action: 'redo', what: 'Redo' },
  { keys: 'Delete  or  Backspace', action: 'delete', what: 'Delete the selection' },
  { keys: 'Ctrl+D', action: 'duplicate', what: 'Duplicate the selection' },
  { keys: 'P', action: 'play', what: 'Play or pause the live preview' },
  { keys: 'Shift+P', action: 'restart', what: 'Restart the preview with the current scene' },
  { keys: '←  /  →', action: 'frame-back', what: 'Previous / next frame' },
  { keys: 'Shift+←  /  Shift+→', action: 'frames-back', what: 'Ten frames back / forward' },
  { keys: 'N', action: 'snap', what: 'Snapping: grid → cells → off' },
  { keys: 'F', action: 'fit', what: 'Fit the tank in the view' },
  { keys: 'Ctrl+S', action: 'save', what: 'Save as a new version' },
  { keys: 'Esc', action: 'escape', what: 'Cancel the shape in progress, clear the selection' },
  { keys: '?', action: 'help', what: 'Show or hide this list' },
];

/** The action for a key event, or null. `key` is KeyboardEvent.key; `mod` is Ctrl or ⌘. */
export function actionForKey(key: string, mod: boolean, shift: boolean): Action | null {
  const k = key.length === 1 ? key.toLowerCase() : key;
  if (mod) {
    if (k === 'z') return shift ? 'redo' : 'undo';
    if (k === 'y') return 'redo';
    if (k === 'd') return 'duplicate';
    if (k === 's') return 'save';
    return null;
  }
  if (key === '?') return 'help';
  const tools: Record<string, ToolId> = { '1': 'select', '2': 'pour', '3': 'spout', '4': 'wall', '5': 'prop', '6': 'drain', '7': 'tank' };
  if (tools[k]) return `tool:${tools[k]}`;
  if (k === 'Delete' || k === 'Backspace') return 'delete';
  if (k === 'p') return shift ? 'restart' : 'play';
  if (k === 'ArrowLeft') return shift ? 'frames-back' : 'frame-back';
  if (k === 'ArrowRight') return shift ? 'frames-forward' : 'frame-forward';
  if (k === 'n') return 'snap';
  if (k === 'f') return 'fit';
  if (k === 'Escape') return 'escape';
  return null;
}

export type { Group };
