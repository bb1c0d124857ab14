import { CartesianGrid, ComposedChart, Legend, Line, ReferenceArea, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from 'recharts';
import type { FittedLine, TracePoint } from '@/schemas/assay';

export type TraceSeries = { name: string; points: readonly TracePoint[]; fit: FittedLine | null; color: string };

/**
 * Absorbance against time: the readings as dots, the least-squares line drawn over the window it was fitted
 * on, and the window shaded, so a reader can see exactly which readings made the slope.
 */
export function TraceChart({
  series,
  window,
  height = 260,
  label,
}: {
  series: TraceSeries[];
  window: { fromS: number; toS: number } | null;
  height?: number;
  label: string;
}) {
  const all = series.flatMap((s) => s.points);
  if (all.length === 0) return null;
  const minA = Math.min(...all.map((p) => p.a));
  const maxA = Math.max(...all.map((p) => p.a));
  const pad = (maxA - minA) * 0.08 || 0.01;
  return (
    <figure aria-label={label} className="w-full">
      <ResponsiveContainer width="100%" height={height}>
        <ComposedChart margin={{ top: 8, right: 16, bottom: 18, left: 8 }}>
          <CartesianGrid stroke="#e4e0d6" strokeDasharray="3 3" />
          <XAxis type="number" dataKey="t" name="time" unit=" s" domain={['dataMin', 'dataMax']} tick={{ fontSize: 11 }}
            label={{ value: 'time (s)', position: 'insideBottom', offset: -10, fontSize: 11 }} />
          <YAxis type="number" dataKey="a" name="absorbance" domain={[minA - pad, maxA + pad]} tick={{ fontSize: 11 }}
            tickFormatter={(v: number) => v.toFixed(3)} width={56} />
          {window ? <ReferenceArea x1={window.fromS} x2={window.toS} fill="#dea277" fillOpacity={0.16} ifOverflow="extendDomain" /> : null}
          <Tooltip formatter={(v) => (typeof v === 'number' ? v.toFixed(4) : String(v))} />
          <Legend verticalAlign="top" height={24} wrapperStyle={{ fontSize: 12 }} />
          {series.map((s) => (
            <Scatter key={s.name} name={s.name} data={[...s.points]} fill={s.color} line={false} shape="circle" isAnimationActive={false} />
          ))}
          {series
            .filter((s) => s.fit)
            .map((s) => (
              <Line
                key={`${s.name}-fit`}
                name={`${s.name} fit`}
                data={[
                  { t: s.fit!.fromS, a: s.fit!.aAtFrom },
                  { t: s.fit!.toS, a: s.fit!.aAtTo },
                ]}
                dataKey="a"
                stroke={s.color}
                strokeWidth={2}
                dot={false}
                legendType="none"
                isAnimationActive={false}
              />
            ))}
        </ComposedChart>
      </ResponsiveContainer>
    </figure>
  );
}
