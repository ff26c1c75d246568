// Lets each test worker answer the runner between long tests.
// Vitest's worker talks to the runner over an RPC whose calls time out after a fixed 60 s, counted from the moment the
// call is made. A file of long synchronous tests (the solver's stability bakes take 60 s together on a loaded CI
// machine) holds the event loop from one test to the next, so a progress report made at the start is only written
// and answered when the loop next waits for input, and by then its timer has run out: the run fails with
// `Timeout calling "onTaskUpdate"` although every test passed. After a test that held the loop, we wait a moment
// (a timer, not setImmediate: the loop must block in its poll phase for the round trip to the runner to finish).
// Short tests pay nothing.
import { afterEach, beforeEach } from 'vitest';

const LONG_TEST_MS = 500;
const ROUND_TRIP_MS = 100;
let startedAt = 0;

beforeEach(() => {
  startedAt = performance.now();
});

afterEach(async () => {
  if (performance.now() - startedAt > LONG_TEST_MS) await new Promise<void>((resolve) => setTimeout(resolve, ROUND_TRIP_MS));
});
