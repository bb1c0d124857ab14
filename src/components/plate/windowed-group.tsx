import { useState, type ReactNode } from 'react';
import { TraceChart } from '@/components/charts/trace-chart';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import type { CalculationResult, RateWindow, TracePoint } from '@/schemas/assay';
import { ResultLine } from './result-line';

export type WindowedGroup = {
  title: string;
  wells: { total: string; background: string | null; blank: string | null };
  total: TracePoint[];
  background: TracePoint[] | null;
  blank: TracePoint[] | null;
  result: CalculationResult;
};

/**
 * One well group of a plate preview: its readings plotted with the fitted window, a form to move the window (the
 * caller recomputes on the server) or go back to the automatic one, and the result with its flags.
 */
export function WindowedGroupCard({
  group,
  testId,
  notice,
  onWindow,
  busy,
}: {
  group: WindowedGroup;
  testId: string;
  notice?: ReactNode;
  onWindow: (w: RateWindow | null) => void;
  busy: boolean;
}) {
  const r = group.result;
  const [fromS, setFromS] = useState(r.window ? String(r.window.fromS) : '');
  const [toS, setToS] = useState(r.window ? String(r.window.toS) : '');
  const [error, setError] = useState<string | null>(null);
  const wells = [`total ${group.wells.total}`, group.wells.background ? `background ${group.wells.background}` : null, group.wells.blank ? `blank ${group.wells.blank}` : null]
    .filter(Boolean)
    .join(', ');
  return (
    <section aria-label={group.title} className="rounded-card border border-paper-line bg-paper-raised p-3" data-testid={testId}>
      <header className="mb-1 flex flex-wrap items-baseline justify-between gap-2">
        <h4 className="font-medium text-matrix-900">{group.title}</h4>
        <span className="text-xs text-ink-faint">Wells: {wells}</span>
      </header>
      {notice}
      <TraceChart
        label={`${group.title} readings`}
        height={200}
        window={r.window}
        series={[
          { name: 'total', points: group.total, fit: r.fitTotal, color: '#184a42' },
          ...(group.background ? [{ name: 'background', points: group.background, fit: r.fitBackground, color: '#b8682f' }] : []),
          ...(group.blank ? [{ name: 'blank', points: group.blank, fit: null, color: '#77817c' }] : []),
        ]}
      />
      <form
        className="mt-2 flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          const w = { fromS: Number(fromS), toS: Number(toS) };
          if (fromS.trim() === '' || toS.trim() === '' || !Number.isFinite(w.fromS) || !Number.isFinite(w.toS)) return setError('Give both ends of the window in seconds');
          if (!(w.toS > w.fromS)) return setError('The window must end after it starts');
          setError(null);
          onWindow(w);
        }}
      >
        <div className="w-28">
          <TextField label="From (s)" inputMode="decimal" value={fromS} onChange={(e) => setFromS(e.target.value)} error={error ?? undefined} />
        </div>
        <div className="w-28">
          <TextField label="To (s)" inputMode="decimal" value={toS} onChange={(e) => setToS(e.target.value)} />
        </div>
        <Button type="submit" variant="secondary" disabled={busy}>
          Use this window
        </Button>
        {!r.windowAuto ? (
          <Button variant="quiet" disabled={busy} onClick={() => onWindow(null)}>
            Back to automatic
          </Button>
        ) : null}
      </form>
      <div className="mt-2">
        <ResultLine result={r} compact />
      </div>
    </section>
  );
}
