import { useQuery } from '@tanstack/react-query';
import { Button } from '@/components/ui/button';
import { Loading, Notice } from '@/components/ui/layout';
import type { ControlSelection } from '@/schemas/reference-interval-api';
import { intervalQueries } from '../api/interval-queries';
import { DistributionChart } from './distribution-chart';
import { methodNames, num, outlierNames } from './interval-text';

/** One method's result on the selected values: limits, CIs, exclusions, warnings and the dot plot. */
export function DerivationPanel({
  uploadId,
  selection,
  enabled,
  title,
  onSave,
}: {
  uploadId: number;
  selection: ControlSelection;
  enabled: boolean;
  title: string;
  onSave: () => void;
}) {
  const preview = useQuery({ ...intervalQueries.preview(uploadId, selection), enabled });
  const data = preview.data;
  const stale = preview.isPlaceholderData;
  return (
    <section aria-label={`${title}: ${methodNames[selection.method]}`} className={`flex flex-col gap-3 rounded-card border border-paper-line bg-paper-raised p-4 ${stale ? 'opacity-60' : ''}`}>
      <header className="flex items-baseline justify-between gap-2">
        <h3 className="text-base font-semibold text-matrix-900">
          {title}: {methodNames[selection.method]}
        </h3>
        <span className="text-xs text-ink-faint">{outlierNames[selection.outliers]}</span>
      </header>
      {!enabled ? <p className="text-sm text-ink-faint">Choose a file and a valid age band.</p> : null}
      {enabled && preview.isPending ? <Loading what="Deriving" /> : null}
      {preview.error && !stale ? <Notice tone="error">{preview.error.message}</Notice> : null}
      {data && !(preview.error && !stale) ? (
        <>
          <dl className="num grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
            <div>
              <dt className="text-xs text-ink-faint">Lower limit</dt>
              <dd className="text-lg font-semibold" data-testid="lower-limit">{num(data.result.lower)}</dd>
              <dd className="text-xs text-ink-soft">90% CI {data.result.lowerCi ? `${num(data.result.lowerCi[0])} – ${num(data.result.lowerCi[1])}` : 'not given'}</dd>
            </div>
            <div>
              <dt className="text-xs text-ink-faint">Upper limit</dt>
              <dd className="text-lg font-semibold" data-testid="upper-limit">{num(data.result.upper)}</dd>
              <dd className="text-xs text-ink-soft">90% CI {data.result.upperCi ? `${num(data.result.upperCi[0])} – ${num(data.result.upperCi[1])}` : 'not given'}</dd>
            </div>
            <div>
              <dt className="text-xs text-ink-faint">Values used</dt>
              <dd>{data.result.n} of {data.values.length}</dd>
            </div>
            <div>
              <dt className="text-xs text-ink-faint">Mean ± SD</dt>
              <dd>
                {num(data.result.mean)} ± {num(data.result.sd)}
              </dd>
            </div>
            <div className="col-span-2">
              <dt className="text-xs text-ink-faint">Excluded as outliers</dt>
              <dd>{data.result.excluded.length ? data.result.excluded.map(num).join(', ') : 'None'}</dd>
            </div>
          </dl>
          {data.result.warnings.map((w) => (
            <Notice key={w}>
              <strong className="font-semibold">Note. </strong>
              {w}
            </Notice>
          ))}
          <DistributionChart
            label={`Distribution of the control values with the ${methodNames[selection.method]} limits`}
            values={data.values}
            excluded={data.result.excluded}
            lower={data.result.lower}
            upper={data.result.upper}
            lowerCi={data.result.lowerCi}
            upperCi={data.result.upperCi}
            unit={data.unit}
          />
          <div>
            <Button variant="secondary" onClick={onSave} disabled={stale}>
              Save {title} as a draft…
            </Button>
          </div>
        </>
      ) : null}
    </section>
  );
}
