// The live preview's pure side: the preview scene (the same scene on a coarser grid the artist picks) and the
// messages between the editor and its Web Worker.
import type { EditorDoc } from './document';
import type { FrameStats, PropState } from '../sim/solver';

/** Preview resolutions: the bake's cell size times this factor. */
export const PREVIEW_FACTORS = [1, 2, 3, 4] as const;

/**
 * The scene the preview runs: the cell size multiplied by `factor` and the tank rounded to whole preview cells
 * (at least 2 × 2). Particles per cell and everything else are the scene's own.
 */
export function previewScene(doc: EditorDoc, factor: number): EditorDoc {
  const h = doc.tank.cellSize * Math.max(1, factor);
  const whole = (len: number) => Number((Math.max(2, Math.round(len / h)) * h).toFixed(10));
  return { ...doc, tank: { ...doc.tank, cellSize: h, width: whole(doc.tank.width), height: whole(doc.tank.height) } };
}

/** Editor → worker. */
export type PreviewRequest =
  | { type: 'start'; run: number; scene: unknown; factor: number }
  | { type: 'pause'; run: number }
  | { type: 'resume'; run: number }
  | { type: 'stop' };

/** Worker → editor. Arrays are transferred (the worker keeps none of them). */
export type PreviewMessage =
  | { type: 'started'; run: number; cells: { nx: number; ny: number }; cellSize: number; capacity: number }
  | {
      type: 'frame'; run: number; frame: number; count: number;
      /** Positions (m) and speeds (m/s), length `count`. */
      x: Float32Array; y: Float32Array; speed: Float32Array;
      /** Liquid of each particle (index into the scene's liquids), length `count`. */
      liquid: Uint8Array;
      stats: FrameStats;
      /** Every prop's pose and velocity at this frame (centroid in tank m, angle in degrees), keyed or free. */
      props: PropState[];
    }
  | { type: 'done'; run: number; frame: number }
  | { type: 'error'; run: number; message: string };
