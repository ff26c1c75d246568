// One worker thread of a solver team (solver-team.ts): runs its rank's share of each task of the solver it is
// attached to (src/lib/sim/parallel.ts), and waits for the next attach after a detach.
import { parentPort, workerData } from 'node:worker_threads';
import { runTeamMember, type TeamAttach } from '../sim/parallel';

const port = parentPort!;
const rank = (workerData as { rank: number }).rank;
port.on('message', (m: TeamAttach) => {
  if (m.type === 'attach') runTeamMember(m, rank);
});
port.postMessage('ready');
