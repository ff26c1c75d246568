// What the editor page hands the editor island.
import type { EditorDoc } from '~/lib/editor/document';

export interface EditorBoot {
  studio: { id: number; slug: string };
  shot: {
    id: number; code: string; firstFrame: number; lastFrame: number; headHandles: number; tailHandles: number; frameRate: string;
    plateWidth: number; plateHeight: number; metresPerPixel: number | null;
    /** Source timecode of the cut-in frame (null: 00:00:00:00). */
    sourceTimecodeIn: string | null;
    /** Shot frame number of the plate's first frame (null: the cut in). */
    plateFirstFrame: number | null;
  };
  scene: EditorDoc;
  /** The version the scene came from (null: a new scene). */
  startedFrom: { id: number; number: number } | null;
  /** A short-lived URL of the shot's plate (image or video), or null. */
  plate: { assetId: number; url: string; contentType: string; width: number; height: number } | null;
  /** Something to tell the artist about how the scene was loaded. */
  loadNote: string | null;
}
