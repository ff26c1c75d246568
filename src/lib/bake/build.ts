// Identifies the solver build that baked a clip. Bump it when a solver change alters baked frames,
// so stored clips are not reused for scenes that would now bake differently.
// 2: the drift correction's time scale no longer shrinks with CFL substeps (stages.ts, DRIFT_TIME).
// 3: trapezoidal position update and the drift correction as a displacement outside the velocities
//    (stages.ts, gridToParticles); the projection solves the divergence alone; free props coupled into the
//    projection (rigid.ts); densities beside walls and props compared with the share of ρ₀ they read at rest.
// 4: free props take the opposite of the collision stage's push on the particles they overtake (stages.ts
//    collide, Newton's third law) and the viscous stage's stress on their faces (viscosity.ts reaction).
// 5: the drift solve stops at a relative residual of 1 % at most (stages.ts, DRIFT_TOLERANCE): scenes whose
//    pressure tolerance is below 1e-2 bake differently; at 1e-2 and above (the default) frames are unchanged.
// 6: foam and spray's potentials clamped in the kernel's own units, read without the substep's gravity kick, and
//    capped at half the liquid's capacity (sim/diffuse.ts): clips' foam sections change; liquid frames do not.
// 7: viscous liquids emit foam and spray by their Ohnesorge number (sim/diffuse.ts breakupFactor): thick paint
//    throws none; water's foam, and every liquid frame, bake as before.
export const SOLVER_BUILD = 'tidemark-flip/7';
