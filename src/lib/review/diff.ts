// What changed between two scene documents, for the compare screen: one row per change, pure and deterministic.
// Objects (pours, spouts, walls, props, drains) are matched by id; tank, timing and physics are compared field by field.
import { shapeCentroid, type Shape } from '../scene/shapes';
import { parseScene } from '../scene/schema';

export const OBJECT_GROUPS = ['liquids', 'pours', 'spouts', 'walls', 'props', 'drains'] as const;
export type ObjectGroup = (typeof OBJECT_GROUPS)[number];
export type ChangeArea = 'tank' | 'timing' | 'physics' | ObjectGroup;

/**
 * One row of the change table.
 * - `changed`: a value differs (`before` → `after`).
 * - `added` / `removed`: an object exists in one version only (`after` / `before` holds it).
 * - `moved`: an object's shape kept its size and form but sits elsewhere (`offset` in metres, x right, y up).
 * - `reshaped`: an object's shape changed size, form or type (`offset` set when its centre moved as well).
 */
export interface SceneChange {
  area: ChangeArea;
  kind: 'changed' | 'added' | 'removed' | 'moved' | 'reshaped';
  /** Dotted path in the scene document, with objects named by id: `spouts[jet].velocity`. */
  path: string;
  /** The object's id for object rows. */
  objectId?: string;
  before?: unknown;
  after?: unknown;
  offset?: [number, number];
  /** A short sentence for the table. */
  summary: string;
}

/** Differences below 1e-9 (absolute under 1, relative above) are float rounding from editing, not edits. */
const EPS = 1e-9;
const close = (a: number, b: number) => Math.abs(a - b) <= EPS * Math.max(1, Math.abs(a), Math.abs(b));

type Doc = Record<string, unknown>;
const isObj = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Structural equality with the same tolerance for numbers. */
export function sameValue(a: unknown, b: unknown): boolean {
  if (typeof a === 'number' && typeof b === 'number') return close(a, b);
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((x, i) => sameValue(x, b[i]));
  if (isObj(a) && isObj(b)) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) if (!sameValue(a[k], b[k])) return false;
    return true;
  }
  return a === b;
}

const fmt = (v: unknown): string => {
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(6)));
  if (v === undefined) return '(not set)';
  return JSON.stringify(v, (_k, x) => (typeof x === 'number' && !Number.isInteger(x) ? Number(x.toPrecision(6)) : x));
};
const metres = (v: number) => `${Number(v.toFixed(4))} m`;

/** Field-by-field rows for a section (tank, timing, physics), recursing into nested objects such as tank.sides. */
function sectionChanges(area: ChangeArea, prefix: string, a: unknown, b: unknown, out: SceneChange[]) {
  if (isObj(a) && isObj(b)) {
    const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
    for (const k of keys) sectionChanges(area, `${prefix}.${k}`, a[k], b[k], out);
    return;
  }
  if (sameValue(a, b)) return;
  out.push({ area, kind: 'changed', path: prefix, before: a, after: b, summary: `${prefix}: ${fmt(a)} → ${fmt(b)}` });
}

/** If `b` is `a` translated, the translation (metres); else null. Shapes of different types never match. */
export function translationBetween(a: Shape, b: Shape): [number, number] | null {
  if (a.type === 'rect' && b.type === 'rect') {
    return close(a.width, b.width) && close(a.height, b.height) ? [b.x - a.x, b.y - a.y] : null;
  }
  if (a.type === 'circle' && b.type === 'circle') return close(a.radius, b.radius) ? [b.x - a.x, b.y - a.y] : null;
  if (a.type === 'polygon' && b.type === 'polygon') {
    if (a.points.length !== b.points.length || a.points.length === 0) return null;
    const dx = b.points[0][0] - a.points[0][0];
    const dy = b.points[0][1] - a.points[0][1];
    const same = a.points.every((p, i) => close(p[0] + dx, b.points[i][0]) && close(p[1] + dy, b.points[i][1]));
    return same ? [dx, dy] : null;
  }
  return null;
}

const isShape = (v: unknown): v is Shape =>
  isObj(v) && (v.type === 'rect' || v.type === 'circle' || (v.type === 'polygon' && Array.isArray(v.points)));

function shapeChange(group: ObjectGroup, id: string, a: unknown, b: unknown, out: SceneChange[]) {
  if (sameValue(a, b)) return;
  const path = `${group}[${id}].shape`;
  if (!isShape(a) || !isShape(b)) {
    out.push({ area: group, kind: 'reshaped', path, objectId: id, before: a, after: b, summary: `${id}: shape changed` });
    return;
  }
  const t = translationBetween(a, b);
  if (t) {
    out.push({ area: group, kind: 'moved', path, objectId: id, before: a, after: b, offset: t, summary: `${id}: moved by ${metres(t[0])} across, ${metres(t[1])} up` });
    return;
  }
  const [ax, ay] = shapeCentroid(a);
  const [bx, by] = shapeCentroid(b);
  const offset: [number, number] = [bx - ax, by - ay];
  const centreMoved = !close(offset[0], 0) || !close(offset[1], 0);
  const form = a.type !== b.type ? `${a.type} → ${b.type}` : 'size or outline changed';
  out.push({
    area: group,
    kind: 'reshaped',
    path,
    objectId: id,
    before: a,
    after: b,
    ...(centreMoved ? { offset } : {}),
    summary: `${id}: ${form}${centreMoved ? `, centre moved by ${metres(offset[0])} across, ${metres(offset[1])} up` : ''}`,
  });
}

function objectChanges(group: ObjectGroup, a: unknown, b: unknown, out: SceneChange[]) {
  const list = (v: unknown) => (Array.isArray(v) ? v.filter(isObj) : []);
  const before = new Map(list(a).map((o) => [String(o.id), o]));
  const after = new Map(list(b).map((o) => [String(o.id), o]));
  const singular = group.slice(0, -1);
  for (const [id, o] of before) {
    if (!after.has(id)) out.push({ area: group, kind: 'removed', path: `${group}[${id}]`, objectId: id, before: o, summary: `${singular} ${id} removed` });
  }
  for (const [id, o] of after) {
    const old = before.get(id);
    if (!old) {
      out.push({ area: group, kind: 'added', path: `${group}[${id}]`, objectId: id, after: o, summary: `${singular} ${id} added` });
      continue;
    }
    shapeChange(group, id, old.shape, o.shape, out);
    const keys = [...new Set([...Object.keys(old), ...Object.keys(o)])].filter((k) => k !== 'id' && k !== 'shape').sort();
    for (const k of keys) {
      if (sameValue(old[k], o[k])) continue;
      const path = `${group}[${id}].${k}`;
      const summary =
        k === 'keys' && Array.isArray(old[k]) && Array.isArray(o[k])
          ? `${id}: animation keys changed (${(old[k] as unknown[]).length} → ${(o[k] as unknown[]).length} keys)`
          : `${id}: ${k} ${fmt(old[k])} → ${fmt(o[k])}`;
      out.push({ area: group, kind: 'changed', path, objectId: id, before: old[k], after: o[k], summary });
    }
  }
}

/**
 * Lists what changed from scene `a` (the older version) to scene `b`, in a fixed order: tank, timing, physics,
 * then each object group (removed, then added or changed in `b`'s order). An empty list means the scenes match.
 */
export function diffScenes(a: unknown, b: unknown): SceneChange[] {
  const out: SceneChange[] = [];
  // Both sides are read as the solver reads them (a version 1 document migrates to version 2, every default
  // filled in), so a default that only one format spells out is not listed as a change; a document that does
  // not parse is compared as stored.
  const A: Doc = normalised(a);
  const B: Doc = normalised(b);
  // The document's format version is not a change anyone made: not listed.
  for (const section of ['tank', 'timing', 'physics'] as const) sectionChanges(section, section, A[section], B[section], out);
  for (const group of OBJECT_GROUPS) objectChanges(group, A[group], B[group], out);
  return out;
}

function normalised(doc: unknown): Doc {
  const r = parseScene(doc);
  if (r.ok) return r.scene as unknown as Doc;
  return isObj(doc) ? doc : {};
}

/** Counts rows per kind, for a one-line summary above the table. */
export function countChanges(changes: SceneChange[]): Record<SceneChange['kind'], number> {
  const c = { changed: 0, added: 0, removed: 0, moved: 0, reshaped: 0 };
  for (const ch of changes) c[ch.kind]++;
  return c;
}
