// Undo history: the current document plus the commands that led to it (undo reverts the last, redo re-applies it).
import type { Command } from './commands';
import type { EditorDoc } from './document';

export class History {
  private done: Command[] = [];
  private undone: Command[] = [];
  /** Counts every change (do, undo, redo) so views can tell documents apart cheaply. */
  revision = 0;

  constructor(public doc: EditorDoc, private readonly limit = 500) {}

  /** Applies a command and records it; clears the redo list. Returns the new document. */
  execute(command: Command): EditorDoc {
    this.doc = command.apply(this.doc);
    this.done.push(command);
    if (this.done.length > this.limit) this.done.shift();
    this.undone = [];
    this.revision++;
    return this.doc;
  }

  undo(): Command | null {
    const c = this.done.pop();
    if (!c) return null;
    this.doc = c.revert(this.doc);
    this.undone.push(c);
    this.revision++;
    return c;
  }

  redo(): Command | null {
    const c = this.undone.pop();
    if (!c) return null;
    this.doc = c.apply(this.doc);
    this.done.push(c);
    this.revision++;
    return c;
  }

  get canUndo(): boolean { return this.done.length > 0; }
  get canRedo(): boolean { return this.undone.length > 0; }
  /** Label of the command undo would revert. */
  get undoLabel(): string | null { return this.done.at(-1)?.label ?? null; }
  get redoLabel(): string | null { return this.undone.at(-1)?.label ?? null; }
}
