// Scene errors for the save panel in words: the field path becomes "Spout 1 · end frame" (fieldLabel) and schema names
// inside a message ("endFrame must not be before startFrame", "already used by liquids.0") become words too.
import { fieldLabel } from '../scene/labels';
import type { SceneError } from '../scene/schema';

/** A schema message with its field names and dotted paths in words. */
export function messageInWords(message: string): string {
  return message
    // dotted paths with an index, e.g. liquids.0 or spouts.2.endFrame
    .replace(/\b[a-z]+(?:\.\d+)(?:\.[a-zA-Z]+(?:\.\d+)?)*\b/g, (path) => fieldLabel(path))
    // camelCase names, e.g. endFrame → end frame, cellSize → cell size
    .replace(/\b([a-z]+)([A-Z][a-z]+)+\b/g, (name) => name.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase());
}

/** One line per error: where, in words, and what is wrong, in words. */
export function errorInWords(e: SceneError): { where: string; what: string } {
  return { where: fieldLabel(e.path), what: messageInWords(e.message) };
}
