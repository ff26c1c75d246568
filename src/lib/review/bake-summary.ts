// The one-line summary of a bake's liquid beside its charts: did the liquid keep its volume?

/** The per-frame figures the summary reads (a subset of the solver's FrameStats). */
export interface AreaFrame {
  count: number;
  /** m², null when the frame was not measured. */
  liquidArea: number | null;
}

/**
 * Change of the liquid's area per particle from the first frame with liquid to the last frame, as a fraction (null
 * when unmeasured). Per particle, so liquid a spout adds or a drain removes is not read as volume gained or lost;
 * a last frame with particles but no measured area (the liquid left the tank or blew apart) reads −100 %.
 */
export function areaChange(frames: readonly AreaFrame[]): number | null {
  const measured = frames.filter((f) => typeof f.liquidArea === 'number' && Number.isFinite(f.liquidArea) && f.count > 0);
  const first = measured.find((f) => (f.liquidArea as number) > 0);
  const last = measured[measured.length - 1];
  if (!first || !last || last === first) return null;
  return (last.liquidArea as number) / last.count / ((first.liquidArea as number) / first.count) - 1;
}
