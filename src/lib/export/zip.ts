// A ZIP of PNG frames (fflate's zipSync; PNGs are stored, not deflated again: they are compressed already).
import { zipSync, type Zippable } from 'fflate';

/** Returns the ZIP bytes of the named PNG files, in order. */
export function zipFrames(files: { name: string; png: Uint8Array }[]): Uint8Array {
  const entries: Zippable = {};
  for (const f of files) entries[f.name] = [f.png, { level: 0 }];
  return zipSync(entries);
}
