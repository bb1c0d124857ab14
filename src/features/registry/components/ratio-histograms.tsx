import { Area, CartesianGrid, ComposedChart, ReferenceArea, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import type { CohortPlots } from '@/schemas/registry';

type Histogram = CohortPlots['ratioToCs'][number];

const fmt = (v: number) => String(Number(v.toPrecision(3)));

/** Step outline of the bins: each bin's count held from its lower edge to the next. */
function stepPoints(h: Histogram): { x: number; count: number }[] {
  const points = h.bins.map((b) => ({ x: b.from, count: b.count }));
  const last = h.bins.at(-1);
  if (last) points.push({ x: Number((last.from + h.binWidth).toPrecision(12)), count: last.count });
  return points;
}

function OneHistogram({ h }: { h: Histogram }) {
  const points = stepPoints(h);
  const top = points.at(-1)?.x ?? 1;
  return (
    <figure className="rounded-md border border-paper-line/70 bg-paper-raised p-2" aria-label={`${h.assay} ratio to CS: ${h.n} values`}>
      <figcaption className="mb-1 flex items-baseline justify-between gap-2 text-xs">
        <span className="font-semibold text-matrix-900">{h.assay} / CS</span>
        <span className="text-ink-faint">n = {h.n.toLocaleString('en-GB')}</span>
      </figcaption>
      {h.n === 0 ? (
        <p className="py-8 text-center text-xs text-ink-faint">No values in this cohort</p>
      ) : (
        <ResponsiveContainer width="100%" height={120}>
          <ComposedChart data={points} margin={{ top: 4, right: 8, bottom: 0, left: -18 }}>
            <CartesianGrid stroke="#e4e0d6" strokeDasharray="2 4" vertical={false} />
            {h.interval ? <ReferenceArea x1={h.interval.lower} x2={h.interval.upper} fill="#a9d2c8" fillOpacity={0.45} ifOverflow="hidden" /> : null}
            <XAxis type="number" dataKey="x" domain={[0, top]} tick={{ fontSize: 10 }} tickFormatter={fmt} tickCount={5} />
            <YAxis allowDecimals={false} tick={{ fontSize: 10 }} width={40} />
            <Area type="stepAfter" dataKey="count" stroke="#9a5424" fill="#dea277" fillOpacity={0.55} isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      )}
      <p className="mt-1 text-[11px] leading-tight text-ink-soft">
        {h.interval
          ? `Shaded: reference interval ${fmt(h.interval.lower)}–${fmt(h.interval.upper)} (${h.interval.n === h.n ? 'every value was' : `${h.interval.n.toLocaleString('en-GB')} of ${h.n.toLocaleString('en-GB')} values were`} read against it)`
          : 'No reference interval applied'}
        {h.n > 0 ? `; bins ${fmt(h.binWidth)} wide, the last holds everything above.` : ''}
      </p>
    </figure>
  );
}

/** Small multiples: how each complex's ratio to citrate synthase is spread across the cohort. */
export function RatioHistograms({ plots }: { plots: CohortPlots }) {
  return (
    <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
      {plots.ratioToCs.map((h) => <OneHistogram key={h.assay} h={h} />)}
    </div>
  );
}
