// `npm run bench`: every benchmark, one after another, each printing its figures and a final JSON line.
// Speed is measured here, never asserted in tests. Pass names to run a subset: npm run bench -- clip bake
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { projectRoot as root } from './services';

const BENCHES: { name: string; file: string; args: string[]; what: string }[] = [
  { name: 'sim', file: 'src/cli/bench-sim.ts', args: ['--ref'], what: 'solver vs the native measuring stick (same run)' },
  { name: 'pressure', file: 'src/cli/bench-pressure.ts', args: [], what: 'pressure solvers: iterations and ms per solve at 64², 128², 256²' },
  { name: 'clip', file: 'src/cli/bench-clip.ts', args: [], what: 'clip size, error, encode/decode/seek' },
  { name: 'cost', file: 'src/cli/bench-cost.ts', args: ['48'], what: 'solver work units per second (sets the default bake cost limit)' },
  { name: 'bake', file: 'src/cli/bench-bake.ts', args: [], what: 'bake throughput with 1 and 2 worker threads' },
  { name: 'player', file: 'src/cli/bench-player.ts', args: [], what: 'player frame time, 100k particles plus foam, headless Chromium' },
  { name: 'preview', file: 'src/cli/bench-preview.ts', args: [], what: 'live preview frames per second in headless Chromium' },
  { name: 'export', file: 'src/cli/bench-export.ts', args: [], what: 'GIF, MP4 and comp passes ZIP export of 96 frames at 960×540' },
  { name: 'api', file: 'src/cli/bench-api.ts', args: [], what: 'library API under load: one app process, autocannon at 10 and 50 connections' },
];

const wanted = process.argv.slice(2);
const summary: Record<string, unknown> = {};

for (const b of BENCHES) {
  if (wanted.length && !wanted.includes(b.name)) continue;
  if (!existsSync(path.join(root, b.file))) continue;
  console.log(`\n━━ ${b.name}: ${b.what}`);
  const last = await new Promise<string | null>((resolve) => {
    const child = spawn(path.join(root, 'node_modules/.bin/tsx'), [b.file, ...b.args], { cwd: root, stdio: ['ignore', 'pipe', 'inherit'] });
    let lastJson: string | null = null;
    let buffer = '';
    child.stdout.on('data', (d: Buffer) => {
      process.stdout.write(d);
      buffer += d.toString();
      const lines = buffer.split('\n');
      buffer = lines.pop() ?? '';
      for (const line of lines) if (line.trim().startsWith('{')) lastJson = line.trim();
    });
    child.on('close', (code) => {
      if (buffer.trim().startsWith('{')) lastJson = buffer.trim();
      if (code !== 0) console.log(`(${b.name} exited with code ${code})`);
      resolve(lastJson);
    });
  });
  if (last) {
    try {
      summary[b.name] = JSON.parse(last);
    } catch {
      /* not JSON after all */
    }
  }
}
console.log('\n━━ summary');
console.log(JSON.stringify(summary));
