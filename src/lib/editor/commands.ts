// Document commands: every change to the scene is one of these. A command turns a document into the next one
// (never mutating it) and turns that one back into exactly the document it started from, so history can undo
// and redo by replaying them.
import { type EditorDoc, type Group, type AnyItem, type ItemRef, clone } from './document';

export interface Command {
  /** Short past-tense text for menus and the history readout, e.g. "Add pour-1". */
  readonly label: string;
  /** Returns the changed document (the input is left as it was). */
  apply(doc: EditorDoc): EditorDoc;
  /** Returns the document `apply` started from, given the document `apply` returned. */
  revert(doc: EditorDoc): EditorDoc;
}

type Section = 'tank' | 'timing' | 'physics' | 'liquids';

function withGroup<G extends Group>(doc: EditorDoc, group: G, items: EditorDoc[G]): EditorDoc {
  return { ...doc, [group]: items };
}

function indexOf(doc: EditorDoc, ref: ItemRef): number {
  const i = (doc[ref.group] as AnyItem[]).findIndex((it) => it.id === ref.id);
  if (i < 0) throw new Error(`no ${ref.group} item '${ref.id}'`);
  return i;
}

/** Adds `item` to `group` (at `index`, default the end). */
export function addItem(group: Group, item: AnyItem, index?: number): Command {
  const stored = clone(item);
  return {
    label: `Add ${stored.id}`,
    apply(doc) {
      const list = [...(doc[group] as AnyItem[])];
      if (list.some((it) => it.id === stored.id)) throw new Error(`id '${stored.id}' is already in ${group}`);
      list.splice(index ?? list.length, 0, clone(stored));
      return withGroup(doc, group, list as EditorDoc[Group]);
    },
    revert(doc) {
      const list = [...(doc[group] as AnyItem[])];
      list.splice(indexOf(doc, { group, id: stored.id }), 1);
      return withGroup(doc, group, list as EditorDoc[Group]);
    },
  };
}

/** Removes the referenced items; undo puts each back at its old place. */
export function removeItems(refs: readonly ItemRef[]): Command {
  let removed: { ref: ItemRef; index: number; item: AnyItem }[] = [];
  return {
    label: refs.length === 1 ? `Delete ${refs[0].id}` : `Delete ${refs.length} items`,
    apply(doc) {
      removed = refs.map((ref) => ({ ref, index: indexOf(doc, ref), item: (doc[ref.group] as AnyItem[])[indexOf(doc, ref)] }));
      let out = doc;
      for (const ref of refs) {
        out = withGroup(out, ref.group, (out[ref.group] as AnyItem[]).filter((it) => it.id !== ref.id) as EditorDoc[Group]);
      }
      return out;
    },
    revert(doc) {
      let out = doc;
      // Re-insert in ascending index order per group so each lands where it was.
      const sorted = [...removed].sort((a, b) => a.index - b.index);
      for (const r of sorted) {
        const list = [...(out[r.ref.group] as AnyItem[])];
        list.splice(r.index, 0, r.item);
        out = withGroup(out, r.ref.group, list as EditorDoc[Group]);
      }
      return out;
    },
  };
}

/** Replaces an item by a new value (same group; the id may change, e.g. a rename). */
export function updateItem(ref: ItemRef, next: AnyItem, label = `Change ${ref.id}`): Command {
  const stored = clone(next);
  let before: AnyItem | null = null;
  return {
    label,
    apply(doc) {
      const i = indexOf(doc, ref);
      const list = [...(doc[ref.group] as AnyItem[])];
      before = list[i];
      list[i] = clone(stored);
      return withGroup(doc, ref.group, list as EditorDoc[Group]);
    },
    revert(doc) {
      const i = indexOf(doc, { group: ref.group, id: stored.id });
      const list = [...(doc[ref.group] as AnyItem[])];
      list[i] = before!;
      return withGroup(doc, ref.group, list as EditorDoc[Group]);
    },
  };
}

/** Replaces several items at once (a move of a multiple selection). */
export function updateItems(changes: readonly { ref: ItemRef; next: AnyItem }[], label: string): Command {
  return batch(label, changes.map((c) => updateItem(c.ref, c.next)));
}

/** Sets the tank, timing or physics section, or the list of liquids. */
export function setSection<S extends Section>(section: S, value: EditorDoc[S], label = `Change ${section}`): Command {
  const stored = clone(value);
  let before: EditorDoc[S] | null = null;
  return {
    label,
    apply(doc) {
      before = doc[section];
      return { ...doc, [section]: clone(stored) };
    },
    revert(doc) {
      return { ...doc, [section]: before! };
    },
  };
}

/** Replaces the whole document (a starting look, a restored draft, a scene pasted in). */
export function replaceDocument(next: EditorDoc, label = 'Replace scene'): Command {
  const stored = clone(next);
  let before: EditorDoc | null = null;
  return {
    label,
    apply(doc) {
      before = doc;
      return clone(stored);
    },
    revert() {
      return before!;
    },
  };
}

/** Several commands as one step of history (applied in order, reverted in reverse order). */
export function batch(label: string, commands: readonly Command[]): Command {
  return {
    label,
    apply(doc) {
      return commands.reduce((d, c) => c.apply(d), doc);
    },
    revert(doc) {
      return commands.reduceRight((d, c) => c.revert(d), doc);
    },
  };
}
