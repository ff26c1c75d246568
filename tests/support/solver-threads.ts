// Test setup: TIDEMARK_TEST_THREADS=N (N > 1) runs every solver the tests create on a team of N threads
// (src/lib/sim/parallel.ts), always on the threaded stages, e.g.
// `TIDEMARK_TEST_THREADS=2 npx vitest run --config tests/vitest.config.ts tests/sim`.
import { afterAll } from 'vitest';
import { setDefaultSolverTeam } from '../../src/lib/sim/parallel';
import { createSolverTeam } from '../../src/lib/bake/solver-team';

// TIDEMARK_TEST_SCHEDULE=adaptive lets the team pick serial stages where they run faster (a busy machine, where
// the always-threaded default can take several times longer); the bytes are the same either way.
const threads = Number(process.env.TIDEMARK_TEST_THREADS ?? 1);
if (threads > 1) {
  const team = await createSolverTeam(threads, process.env.TIDEMARK_TEST_SCHEDULE === 'adaptive' ? 'adaptive' : 'threaded');
  setDefaultSolverTeam(team);
  afterAll(async () => {
    setDefaultSolverTeam(null);
    await team.end();
  });
}
