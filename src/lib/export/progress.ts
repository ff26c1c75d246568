// Progress of an export across its stages, with an ETA. Pure: the clock is passed in, so tests can drive it.

export const EXPORT_STAGES = ['preparing', 'rendering', 'encoding', 'uploading'] as const;
export type ExportStage = (typeof EXPORT_STAGES)[number];

export const STAGE_LABELS: Record<ExportStage, string> = {
  preparing: 'Preparing',
  rendering: 'Rendering frames',
  encoding: 'Encoding',
  uploading: 'Storing the file',
};

export interface ProgressReport {
  stage: ExportStage;
  /** Progress inside the stage, 0–1. */
  stageFraction: number;
  /** Progress of the whole export, 0–1. */
  fraction: number;
  /** Seconds left, or null until there is enough to go on. */
  etaSeconds: number | null;
  /** e.g. "frame 12 of 48". */
  detail: string;
}

/**
 * Weights the stages by their usual share of the time (rendering is cheap next to H.264 or GIF quantisation) and
 * estimates the time left from the rate so far: elapsed · (1 − f) / f once f ≥ 2 %.
 */
export class ProgressTracker {
  private started: number;
  private weights: Record<ExportStage, number>;

  constructor(
    weights: Partial<Record<ExportStage, number>>,
    private now: () => number = () => performance.now(),
  ) {
    const w = { preparing: 0.02, rendering: 0.4, encoding: 0.55, uploading: 0.03, ...weights };
    const total = Object.values(w).reduce((a, b) => a + b, 0);
    this.weights = Object.fromEntries(Object.entries(w).map(([k, v]) => [k, v / total])) as Record<ExportStage, number>;
    this.started = this.now();
  }

  /** Returns the report for a stage at a fraction (clamped to 0–1). */
  report(stage: ExportStage, stageFraction: number, detail = ''): ProgressReport {
    const f = Math.max(0, Math.min(1, stageFraction));
    let before = 0;
    for (const s of EXPORT_STAGES) {
      if (s === stage) break;
      before += this.weights[s];
    }
    const fraction = Math.min(1, before + this.weights[stage] * f);
    const elapsed = (this.now() - this.started) / 1000;
    const etaSeconds = fraction >= 0.02 && fraction < 1 ? Math.max(0, (elapsed * (1 - fraction)) / fraction) : fraction >= 1 ? 0 : null;
    return { stage, stageFraction: f, fraction, etaSeconds, detail };
  }
}

/** "about 12 s", "about 2 min", or "" when unknown. */
export function formatEta(seconds: number | null): string {
  if (seconds === null || !Number.isFinite(seconds)) return '';
  if (seconds < 1) return 'almost done';
  if (seconds < 90) return `about ${Math.ceil(seconds)} s left`;
  return `about ${Math.round(seconds / 60)} min left`;
}
