import type { CohortComplex, CohortMember, CohortPlots } from '@/schemas/registry';

const ROW = 34;
const LEFT = 64;
const WIDTH = 640;
const RIGHT = 16;
const TOP = 22;

/**
 * % of the reference mean of each complex's ratio to CS: a box per complex for the whole cohort (quartiles,
 * whiskers to the lowest and highest), the 100% line, and a dot for each case on the table's current page.
 * Drawn as plain SVG so every mark has a text equivalent in the table beside it.
 */
export function PctOfMeanPlot({ plots, members }: { plots: CohortPlots; members: readonly CohortMember[] }) {
  const rows = plots.pctOfMean;
  const dots = (assay: CohortComplex) =>
    members.flatMap((m) => m.values.filter((v) => v.assay === assay && v.measure === 'ratio_cs' && v.pctOfMean !== null).map((v) => v.pctOfMean!));
  const highest = Math.max(150, ...rows.map((r) => r.max ?? 0), ...rows.flatMap((r) => dots(r.assay)));
  const top = Math.ceil(highest / 50) * 50;
  const x = (pct: number) => LEFT + (Math.max(0, Math.min(pct, top)) / top) * (WIDTH - LEFT - RIGHT);
  const height = TOP + rows.length * ROW + 26;
  const ticks = Array.from({ length: top / 50 + 1 }, (_, i) => i * 50);
  return (
    <figure aria-label="Percent of reference mean per complex">
      <svg viewBox={`0 0 ${WIDTH} ${height}`} className="w-full max-w-3xl" role="img" aria-labelledby="pct-plot-title">
        <title id="pct-plot-title">Ratio to CS as % of the reference mean, per complex</title>
        {ticks.map((t) => (
          <g key={t}>
            <line x1={x(t)} x2={x(t)} y1={TOP - 6} y2={height - 22} stroke={t === 100 ? '#184a42' : '#e4e0d6'} strokeWidth={t === 100 ? 1.5 : 1} strokeDasharray={t === 100 ? '4 3' : undefined} />
            <text x={x(t)} y={height - 8} fontSize={11} textAnchor="middle" fill="#4a5550">{t}%</text>
          </g>
        ))}
        <text x={x(100)} y={TOP - 10} fontSize={10} textAnchor="middle" fill="#184a42">reference mean</text>
        {rows.map((r, i) => {
          const cy = TOP + i * ROW + ROW / 2;
          return (
            <g key={r.assay}>
              <text x={LEFT - 10} y={cy + 4} fontSize={12} textAnchor="end" fill="#133a34" fontWeight={600}>{r.assay}</text>
              {r.n > 0 && r.min !== null && r.max !== null && r.q1 !== null && r.q3 !== null && r.median !== null ? (
                <>
                  <line x1={x(r.min)} x2={x(r.max)} y1={cy} y2={cy} stroke="#5f6964" />
                  <rect x={x(r.q1)} y={cy - 9} width={Math.max(2, x(r.q3) - x(r.q1))} height={18} fill="#d5e9e4" stroke="#2c7365" rx={2} />
                  <line x1={x(r.median)} x2={x(r.median)} y1={cy - 10} y2={cy + 10} stroke="#0e2a26" strokeWidth={2.5} />
                </>
              ) : (
                <text x={LEFT + 6} y={cy + 4} fontSize={11} fill="#5f6964">no values</text>
              )}
              {dots(r.assay).map((p, j) => (
                <circle key={j} cx={x(p)} cy={cy + ((j % 5) - 2) * 2.5} r={3} fill="#b8682f" fillOpacity={0.8} stroke="#fff" strokeWidth={0.6} />
              ))}
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
        <span>Box: middle half of the cohort, bar at the median (whole percent); line: lowest to highest</span>
        <span><span aria-hidden="true" className="text-copper-500">●</span> the cases on this page of the table</span>
      </figcaption>
      {/* A table ignores the 1 px width of sr-only; the wrapper carries it, so the hidden table cannot widen the page. */}
      <div className="sr-only">
        <table>
          <caption>Ratio to CS, % of reference mean, by complex</caption>
          <thead><tr><th>Complex</th><th>n</th><th>Lowest</th><th>Lower quartile</th><th>Median</th><th>Upper quartile</th><th>Highest</th></tr></thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.assay}><td>{r.assay}</td><td>{r.n}</td><td>{r.min ?? '—'}</td><td>{r.q1 ?? '—'}</td><td>{r.median ?? '—'}</td><td>{r.q3 ?? '—'}</td><td>{r.max ?? '—'}</td></tr>
            ))}
          </tbody>
        </table>
      </div>
    </figure>
  );
}
