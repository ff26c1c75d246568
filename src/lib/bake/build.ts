// Identifies the solver build that baked a clip. Bump it when a solver change alters baked frames,
// so stored clips are not reused for scenes that would now bake differently.
export const SOLVER_BUILD = 'tidemark-flip/1';
