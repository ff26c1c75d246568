// The bake's health verdict on the version page, in plain words: nothing for a healthy bake or one stored before
// verdicts existed; for an unhealthy one, each finding and what to try.
import type { BakeHealth } from '~/lib/sim/health';

export default function BakeHealthNote({ health }: { health: BakeHealth | null | undefined }) {
  if (!health || health.healthy) return null;
  return (
    <section className="card border border-coral-100 bg-coral-50 p-5" role="alert" data-testid="bake-health" aria-labelledby="bake-health-heading">
      <h2 id="bake-health-heading" className="text-base font-semibold text-coral-700">
        This bake went wrong: do not judge the splash from it
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-sm leading-relaxed text-ink-soft">
        {health.findings.map((f) => (
          <li key={f.code} data-code={f.code}>
            {f.words}
          </li>
        ))}
      </ul>
      <p className="mt-2 text-sm text-ink-muted">
        Change the scene (a slower prop or spout, or the default physics values) and bake again.
      </p>
    </section>
  );
}
