// Bake statistics beside the player: one small uPlot chart per solver figure, with the playhead marked, so a
// supervisor sees a bake that lost liquid (area falling) or went unstable (CFL, residual or step time jumping).
import { useEffect, useMemo, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { BakeStats } from './types';
import { areaChange } from '~/lib/review/bake-summary';

interface Series {
  key: 'liquidArea' | 'maxSpeed' | 'cfl' | 'pressureResidual' | 'stepMs';
  label: string;
  unit: string;
  log?: boolean;
  /** Solver internals for FX TDs, under the "Advanced" fold. */
  advanced?: boolean;
  format: (v: number) => string;
}

const SERIES: Series[] = [
  { key: 'liquidArea', label: 'Liquid area', unit: 'm²', format: (v) => v.toFixed(v < 0.1 ? 4 : 3) },
  { key: 'maxSpeed', label: 'Max speed', unit: 'm/s', format: (v) => v.toFixed(2) },
  { key: 'cfl', label: 'CFL', unit: '', advanced: true, format: (v) => v.toFixed(2) },
  { key: 'pressureResidual', label: 'Pressure residual', unit: '', log: true, advanced: true, format: (v) => v.toExponential(1) },
  { key: 'stepMs', label: 'Step time', unit: 'ms', advanced: true, format: (v) => v.toFixed(0) },
];

interface Props {
  stats: BakeStats;
  frame: number;
  onSeek: (frame: number) => void;
}

export default function StatsCharts({ stats, frame, onSeek }: Props) {
  const change = areaChange(stats.frames);
  return (
    <section aria-labelledby="stats-heading" className="card p-4" data-testid="bake-stats">
      <div className="flex items-baseline justify-between gap-2">
        <h2 id="stats-heading" className="text-sm font-semibold">
          Bake statistics
        </h2>
        <span className="text-xs text-ink-muted">per frame</span>
      </div>
      {change !== null && (
        <p className={`mt-1 text-xs ${Math.abs(change) > 0.1 ? 'font-medium text-coral-700' : 'text-ink-muted'}`}>
          Liquid area per particle {change >= 0 ? '+' : '−'}
          {Math.abs(change * 100).toFixed(1)} % from first to last frame{Math.abs(change) > 0.1 ? ': check for lost volume' : ''}
        </p>
      )}
      <div className="mt-2 space-y-2">
        {SERIES.filter((s) => !s.advanced).map((s) => (
          <Chart key={s.key} stats={stats} series={s} frame={frame} onSeek={onSeek} />
        ))}
      </div>
      <details className="mt-2 rounded-md border border-sand-line px-2 py-1" data-testid="bake-stats-advanced">
        <summary className="cursor-pointer text-xs font-medium text-ink-soft">Advanced: solver figures for FX TDs</summary>
        <div className="mt-1 space-y-2">
          {SERIES.filter((s) => s.advanced).map((s) => (
            <Chart key={s.key} stats={stats} series={s} frame={frame} onSeek={onSeek} />
          ))}
        </div>
        <p className="mt-2 text-xs text-ink-muted">Solver build {stats.solverBuild}</p>
      </details>
    </section>
  );
}

function Chart({ stats, series, frame, onSeek }: { stats: BakeStats; series: Series; frame: number; onSeek: (f: number) => void }) {
  const host = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const playhead = useRef(frame);
  const seek = useRef(onSeek);
  seek.current = onSeek;

  const data = useMemo(() => {
    const xs = stats.frames.map((f) => f.frame);
    const ys = stats.frames.map((f) => {
      const v = f[series.key];
      if (typeof v !== 'number' || !Number.isFinite(v)) return null;
      if (series.log && v <= 0) return null;
      return v;
    });
    return [xs, ys] as uPlot.AlignedData;
  }, [stats, series]);

  const values = (data[1] as (number | null)[]).filter((v): v is number => v !== null);
  const last = values.length ? values[values.length - 1] : null;
  const peak = values.length ? Math.max(...values) : null;
  const current = (data[1] as (number | null)[])[stats.frames.findIndex((f) => f.frame === frame)] ?? null;

  useEffect(() => {
    const el = host.current!;
    const opts: uPlot.Options = {
      width: Math.max(120, el.clientWidth),
      height: 64,
      padding: [4, 4, 0, 0],
      legend: { show: false },
      cursor: { y: false, points: { show: false }, drag: { x: false, y: false } },
      select: { show: false, left: 0, top: 0, width: 0, height: 0 },
      scales: { x: { time: false }, y: series.log ? { distr: 3 } : {} },
      axes: [
        { show: false },
        {
          size: 44,
          font: '10px "Space Grotesk", sans-serif',
          stroke: '#60717a',
          grid: { stroke: '#e8e2d5', width: 1 },
          ticks: { show: false },
          values: (_u, splits) => splits.map((v) => (v == null || !Number.isFinite(v) ? "" : series.log ? v.toExponential(0) : Math.abs(v) >= 100 ? v.toFixed(0) : String(+v.toPrecision(2)))),
        },
      ],
      series: [{}, { stroke: '#0d7a78', width: 1.5, fill: 'rgba(13,122,120,0.08)', spanGaps: true, points: { show: false } }],
      hooks: {
        draw: [
          (u) => {
            const x = Math.round(u.valToPos(playhead.current, 'x', true));
            const ctx = u.ctx;
            ctx.save();
            ctx.strokeStyle = '#e0583d';
            ctx.lineWidth = 2;
            ctx.beginPath();
            ctx.moveTo(x, u.bbox.top);
            ctx.lineTo(x, u.bbox.top + u.bbox.height);
            ctx.stroke();
            ctx.restore();
          },
        ],
      },
    };
    const u = new uPlot(opts, data, el);
    plot.current = u;
    const click = (e: MouseEvent) => {
      const r = u.over.getBoundingClientRect();
      seek.current(Math.round(u.posToVal(e.clientX - r.left, 'x')));
    };
    u.over.addEventListener('click', click);
    const ro = new ResizeObserver(() => u.setSize({ width: Math.max(120, el.clientWidth), height: 64 }));
    ro.observe(el);
    return () => {
      ro.disconnect();
      u.over.removeEventListener('click', click);
      u.destroy();
      plot.current = null;
    };
  }, [data, series]);

  useEffect(() => {
    playhead.current = frame;
    plot.current?.redraw(false, false);
  }, [frame]);

  return (
    <figure className="m-0">
      <figcaption className="flex items-baseline justify-between gap-2 text-xs">
        <span className="font-medium text-ink-soft">
          {series.label}
          {series.unit && <span className="font-normal text-ink-muted"> ({series.unit})</span>}
        </span>
        <span className="text-ink-muted tabular-nums" title={peak !== null ? `peak ${series.format(peak)}, last ${last !== null ? series.format(last) : '—'}` : undefined}>
          {current !== null ? series.format(current) : '—'}
        </span>
      </figcaption>
      <div ref={host} className="cursor-pointer" />
    </figure>
  );
}
