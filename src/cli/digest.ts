// The daily review digest: e-mails each person who opted in a summary of the last day's review activity.
// Run once a day from cron, e.g. `15 7 * * * cd /srv/tidemark && npx tsx src/cli/digest.ts`, with DATABASE_URL,
// APP_URL and the SMTP_* variables set. Options: --hours N (window, default 24), --dry-run (print, send nothing).
import { sendDigests } from '../lib/server/notify';
import { closeDb } from '../lib/server/db';

function option(name: string): string | undefined {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

async function main(): Promise<number> {
  if (!process.env.DATABASE_URL) {
    console.error('Set DATABASE_URL, APP_URL and the SMTP_* variables (see README: Configuration)');
    return 2;
  }
  const hours = Number(option('--hours') ?? '24');
  if (!Number.isFinite(hours) || hours <= 0 || hours > 24 * 31) {
    console.error('--hours must be a number of hours between 0 and 744');
    return 2;
  }
  const dryRun = process.argv.includes('--dry-run');
  const { since, sent } = await sendDigests({ hours, dryRun });
  console.log(`${dryRun ? 'Would send' : 'Sent'} ${sent.length} digest${sent.length === 1 ? '' : 's'} covering activity since ${since.toISOString()}`);
  for (const s of sent) console.log(`  ${s.email} (${s.lines} lines)`);
  return 0;
}

main()
  .then(async (code) => {
    await closeDb();
    process.exit(code);
  })
  .catch(async (err) => {
    console.error('digest failed:', err);
    await closeDb();
    process.exit(1);
  });
