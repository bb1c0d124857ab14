import { CartesianGrid, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis, ZAxis } from 'recharts';
import { num } from './interval-text';

type Point = { x: number; y: number; excluded: boolean };

/**
 * Stacks the values into a dot plot: each dot sits at its own value, piled up with its neighbours in the
 * same narrow bin, so the shape of the distribution shows without hiding any single control.
 */
export function stackDots(values: readonly number[], excluded: readonly number[], bins = 48): Point[] {
  if (values.length === 0) return [];
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const width = (hi - lo) / bins || 1;
  const pending = [...excluded];
  const heights = new Map<number, number>();
  return [...values]
    .sort((a, b) => a - b)
    .map((v) => {
      const at = pending.indexOf(v);
      if (at >= 0) pending.splice(at, 1);
      const bin = Math.min(bins - 1, Math.floor((v - lo) / width));
      const y = (heights.get(bin) ?? 0) + 1;
      heights.set(bin, y);
      return { x: v, y, excluded: at >= 0 };
    });
}

/** Round axis ticks (1, 2, 2.5 or 5 × 10^k apart) covering [min, max]. */
export function niceTicks(min: number, max: number, count = 6): number[] {
  const span = max - min || Math.abs(max) || 1;
  const raw = span / count;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = ([1, 2, 2.5, 5, 10].find((m) => m * power >= raw) ?? 10) * power;
  const start = Math.floor(min / step) * step;
  const ticks: number[] = [];
  for (let t = start; t <= max + step * 1e-9 || ticks.length < 2; t += step) ticks.push(Math.round(t / step) * step);
  if (ticks[ticks.length - 1]! < max) ticks.push(ticks[ticks.length - 1]! + step);
  return ticks;
}

const LIMIT_COLOUR = '#133a34';
const CI_COLOUR = '#dea277';

export function DistributionChart({
  values,
  excluded,
  lower,
  upper,
  lowerCi,
  upperCi,
  unit,
  label,
  height = 230,
}: {
  values: readonly number[];
  excluded: readonly number[];
  lower: number;
  upper: number;
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
  unit: string;
  label: string;
  height?: number;
}) {
  const points = stackDots(values, excluded);
  if (points.length === 0) return null;
  const kept = points.filter((p) => !p.excluded);
  const dropped = points.filter((p) => p.excluded);
  const xs = [...points.map((p) => p.x), lower, upper, ...(lowerCi ?? []), ...(upperCi ?? [])];
  const minX = Math.min(...xs);
  const maxX = Math.max(...xs);
  const ticks = niceTicks(minX, maxX);
  const maxY = Math.max(...points.map((p) => p.y));
  return (
    <figure aria-label={label} className="w-full">
      <ResponsiveContainer width="100%" height={height}>
        <ScatterChart margin={{ top: 18, right: 12, bottom: 20, left: 0 }}>
          <CartesianGrid stroke="#e4e0d6" strokeDasharray="3 3" vertical={false} />
          <XAxis type="number" dataKey="x" domain={[ticks[0]!, ticks[ticks.length - 1]!]} ticks={ticks} tick={{ fontSize: 11 }}
            tickFormatter={(v: number) => String(Number(v.toPrecision(6)))}
            label={{ value: unit, position: 'insideBottom', offset: -12, fontSize: 11 }} />
          <YAxis type="number" dataKey="y" domain={[0, maxY + 1]} allowDecimals={false} tick={{ fontSize: 11 }} width={28} />
          <ZAxis range={[26, 26]} />
          {lowerCi ? <ReferenceArea x1={lowerCi[0]} x2={lowerCi[1]} fill={CI_COLOUR} fillOpacity={0.3} ifOverflow="extendDomain" /> : null}
          {upperCi ? <ReferenceArea x1={upperCi[0]} x2={upperCi[1]} fill={CI_COLOUR} fillOpacity={0.3} ifOverflow="extendDomain" /> : null}
          <ReferenceLine x={lower} stroke={LIMIT_COLOUR} strokeWidth={2} strokeDasharray="5 3"
            label={{ value: `lower ${num(lower)}`, position: 'top', fontSize: 11, fill: LIMIT_COLOUR }} ifOverflow="extendDomain" />
          <ReferenceLine x={upper} stroke={LIMIT_COLOUR} strokeWidth={2} strokeDasharray="5 3"
            label={{ value: `upper ${num(upper)}`, position: 'top', fontSize: 11, fill: LIMIT_COLOUR }} ifOverflow="extendDomain" />
          <Tooltip cursor={false} formatter={(v) => (typeof v === 'number' ? num(v) : String(v))} />
          <Scatter name="kept" data={kept} fill="#2c7365" shape="circle" isAnimationActive={false} />
          <Scatter name="excluded" data={dropped} fill="#9b2c3a" shape="cross" isAnimationActive={false} />
        </ScatterChart>
      </ResponsiveContainer>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
        <span><span aria-hidden="true" className="text-matrix-500">●</span> control value ({kept.length})</span>
        {dropped.length > 0 ? <span><span aria-hidden="true" className="text-below">✚</span> excluded as outlier ({dropped.length})</span> : null}
        <span><span aria-hidden="true">┆</span> limits</span>
        {lowerCi || upperCi ? <span><span aria-hidden="true" className="text-copper-300">■</span> 90% CI of each limit</span> : null}
      </figcaption>
    </figure>
  );
}
