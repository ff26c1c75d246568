// The drawing facts a bake writes into a version 2 clip's header (format.ts ClipLook), taken from the scene.
import { DEFAULT_PROP_COLOUR, type Scene } from '../scene/schema';
import { shapeCentroid } from '../scene/shapes';
import type { ClipLook } from './format';

/** Liquid colours, walls (with the scene's wall style) and props (drawn shape, centroid, fill colour) of a scene. */
export function clipLookOf(scene: Scene): ClipLook {
  return {
    liquids: scene.liquids.map((l) => ({ id: l.id, colour: l.colour })),
    walls: scene.walls.map((w) => ({ id: w.id, shape: w.shape })),
    wallStyle: scene.look?.walls ?? 'outline',
    props: scene.props.map((p) => ({ id: p.id, shape: p.shape, centroid: shapeCentroid(p.shape), colour: p.colour ?? DEFAULT_PROP_COLOUR })),
  };
}
