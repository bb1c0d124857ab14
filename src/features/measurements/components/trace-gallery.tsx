import { TraceChart } from '@/components/charts/trace-chart';
import type { CaseWorkup } from '@/schemas/measurement';
import { fmt } from '../utils/format';

/** Small charts of every saved measurement's readings, fitted window shaded; typed rates have none to show. */
export function TraceGallery({ workup }: { workup: CaseWorkup }) {
  const label = new Map(workup.specimens.map((s) => [s.id, s.label]));
  const withReadings = workup.measurements.filter((m) => m.inputs.mode !== 'rates');
  const typed = workup.measurements.length - withReadings.length;
  if (workup.measurements.length === 0) return <p className="text-sm text-ink-faint">No measurement yet.</p>;
  return (
    <div className="flex flex-col gap-3">
      {typed > 0 ? <p className="text-sm text-ink-soft">{typed} measurements were entered as typed rates: there are no readings to plot for them.</p> : null}
      <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
        {withReadings.map((m) => {
          if (m.inputs.mode === 'rates') return null;
          const title = `${label.get(m.specimenId)} · ${m.assay} · rep. ${m.replicate}`;
          return (
            <figure key={m.id} className="rounded-md border border-paper-line p-2">
              <figcaption className="flex justify-between text-xs">
                <span className="font-medium">{title}</span>
                <span className="num text-ink-soft">{m.activity === null ? 'no activity' : fmt(m.activity)}</span>
              </figcaption>
              <TraceChart
                label={`${title} readings`}
                height={150}
                window={m.result.window}
                series={[
                  { name: 'total', points: m.inputs.total, fit: m.result.fitTotal, color: '#184a42' },
                  ...(m.inputs.background ? [{ name: 'background', points: m.inputs.background, fit: m.result.fitBackground, color: '#b8682f' }] : []),
                ]}
              />
            </figure>
          );
        })}
      </div>
    </div>
  );
}
