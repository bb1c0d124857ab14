import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { CartesianGrid, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import type { ControlChart, ControlChartPoint, ControlTarget } from '@/schemas/qc';
import { fmt, formatWhen } from '@/utils/format';

/** Where a run's own page lives (built by the runs feature). */
export const runHref = (runId: number) => `/runs/${runId}`;

/** How a point is drawn: one mark per run outcome, each named in words in the caption. */
export type PointKind = 'accepted' | 'warning' | 'rejected' | 'released' | 'unjudged';

export function pointKind(p: Pick<ControlChartPoint, 'runStatus' | 'overridden'>): PointKind {
  if (p.runStatus === 'reject') return p.overridden ? 'released' : 'rejected';
  if (p.runStatus === 'warn') return 'warning';
  if (p.runStatus === 'none') return 'unjudged';
  return 'accepted';
}

const marks: Record<PointKind, { shape: 'circle' | 'triangle' | 'cross' | 'diamond' | 'square'; fill: string; glyph: string; words: string }> = {
  accepted: { shape: 'circle', fill: '#2c7365', glyph: '●', words: 'run accepted' },
  warning: { shape: 'triangle', fill: '#a8692f', glyph: '▲', words: 'run accepted with a 1-2s warning' },
  rejected: { shape: 'cross', fill: '#9b2c3a', glyph: '✚', words: 'run rejected' },
  released: { shape: 'diamond', fill: '#5a2a6b', glyph: '◆', words: 'run rejected, released by a director’s override' },
  unjudged: { shape: 'square', fill: '#8d8a80', glyph: '■', words: 'no approved target when the run was judged' },
};

const LINE = '#133a34';

type Segment = { target: ControlTarget; from: number; to: number };

/**
 * Each approved target as a band in time: from its approval (or the first result judged against it, if earlier)
 * until it was replaced, or to the chart's right edge while it is in force.
 */
export function targetSegments(chart: ControlChart, rightEdge: number): Segment[] {
  return chart.targets.map((target) => {
    const judged = chart.points.filter((p) => p.controlTargetId === target.id).map((p) => Date.parse(p.measuredAt));
    const approvedAt = Date.parse(target.approvedAt ?? target.createdAt);
    const from = Math.min(approvedAt, ...judged);
    const to = target.retiredAt ? Math.max(Date.parse(target.retiredAt), ...judged) : rightEdge;
    return { target, from, to };
  });
}

const SD_STEPS = [-3, -2, -1, 0, 1, 2, 3] as const;

export function LeveyJenningsChart({ chart, unit, label }: { chart: ControlChart; unit: string; label: string }) {
  const navigate = useNavigate();
  // The right edge while a target is in force: the time the chart was first drawn.
  const [now] = useState(() => Date.now());
  const times = chart.points.map((p) => Date.parse(p.measuredAt));
  const starts = chart.targets.map((t) => Date.parse(t.approvedAt ?? t.createdAt));
  const left = Math.min(...times, ...starts, now);
  const right = Math.max(...times, now);
  const pad = Math.max((right - left) * 0.03, 3_600_000);
  const segments = targetSegments(chart, right + pad);
  /** The target in force: the y-axis ticks sit on its mean and SD lines. */
  const current = chart.targets.find((t) => t.status === 'approved');
  const ys = [...chart.points.map((p) => p.value), ...chart.targets.flatMap((t) => [t.mean - 3.5 * t.sd, t.mean + 3.5 * t.sd])];
  const yPad = ys.length ? (Math.max(...ys) - Math.min(...ys)) * 0.04 : 0;
  const groups = (Object.keys(marks) as PointKind[])
    .map((kind) => ({ kind, data: chart.points.filter((p) => pointKind(p) === kind).map((p) => ({ ...p, x: Date.parse(p.measuredAt), y: p.value })) }))
    .filter((g) => g.data.length > 0);

  return (
    <figure aria-label={label} className="w-full">
      <ResponsiveContainer width="100%" height={300}>
        <ScatterChart margin={{ top: 12, right: 64, bottom: 24, left: 8 }}>
          <CartesianGrid stroke="#e4e0d6" strokeDasharray="3 3" />
          <XAxis
            type="number"
            dataKey="x"
            domain={[left - pad, right + pad]}
            tick={{ fontSize: 11 }}
            tickFormatter={(v: number) => new Date(v).toISOString().slice(0, right - left < 2 * 86_400_000 ? 16 : 10).replace('T', ' ')}
            label={{ value: 'run date', position: 'insideBottom', offset: -14, fontSize: 11 }}
          />
          <YAxis
            type="number"
            dataKey="y"
            domain={ys.length ? [Math.min(...ys) - yPad, Math.max(...ys) + yPad] : ['auto', 'auto']}
            ticks={current ? SD_STEPS.map((k) => current.mean + k * current.sd) : undefined}
            tick={{ fontSize: 11 }}
            tickFormatter={(v: number) => fmt(v, 3)}
            width={56}
            label={{ value: unit, angle: -90, position: 'insideLeft', fontSize: 11 }}
          />
          {segments.flatMap(({ target, from, to }) =>
            SD_STEPS.map((k) => (
              <ReferenceLine
                key={`${target.id}:${k}`}
                segment={[
                  { x: from, y: target.mean + k * target.sd },
                  { x: to, y: target.mean + k * target.sd },
                ]}
                stroke={LINE}
                strokeOpacity={k === 0 ? 0.9 : Math.abs(k) === 3 ? 0.75 : 0.45}
                strokeWidth={k === 0 ? 2 : 1}
                strokeDasharray={k === 0 ? undefined : Math.abs(k) === 1 ? '2 4' : Math.abs(k) === 2 ? '6 3' : '10 2'}
                label={
                  target.status === 'approved'
                    ? { value: k === 0 ? 'mean' : `${k > 0 ? '+' : '−'}${Math.abs(k)} SD`, position: 'right', fontSize: 10, fill: LINE }
                    : undefined
                }
                ifOverflow="extendDomain"
              />
            )),
          )}
          <Tooltip
            cursor={false}
            content={({ payload }) => {
              const p = payload?.[0]?.payload as (ControlChartPoint & { x: number }) | undefined;
              if (!p) return null;
              return (
                <div className="rounded border border-paper-line bg-paper-raised px-2 py-1 text-xs shadow-card">
                  <div className="font-medium">{p.runNumber}</div>
                  <div>{formatWhen(p.measuredAt)}</div>
                  <div>
                    {fmt(p.value)} {unit}
                    {p.z !== null ? ` · z ${fmt(p.z, 3)}` : ''}
                  </div>
                  <div>{marks[pointKind(p)].words}</div>
                </div>
              );
            }}
          />
          {groups.map((g) => (
            <Scatter
              key={g.kind}
              name={marks[g.kind].words}
              data={g.data}
              fill={marks[g.kind].fill}
              shape={marks[g.kind].shape}
              isAnimationActive={false}
              cursor="pointer"
              onClick={(d: { payload?: { runId?: number } }) => {
                if (d.payload?.runId) void navigate(runHref(d.payload.runId));
              }}
            />
          ))}
        </ScatterChart>
      </ResponsiveContainer>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
        {groups.map((g) => (
          <span key={g.kind}>
            <span aria-hidden="true" style={{ color: marks[g.kind].fill }}>
              {marks[g.kind].glyph}
            </span>{' '}
            {marks[g.kind].words} ({g.data.length})
          </span>
        ))}
        <span>── target mean; dotted ±1 SD, dashed ±2 SD, long dashes ±3 SD</span>
        {chart.points.length === 0 ? <span>No control results yet: the lines show the approved target.</span> : null}
      </figcaption>
    </figure>
  );
}
