import { useMemo, useState } from 'react';
import { Button } from '@/components/ui/button';
import { TraceChart } from '@/components/charts/trace-chart';
import { SelectField, TextArea, TextField } from '@/components/ui/field';
import { Card, Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { besideField } from '@/lib/form';
import { calculationRequestSchema, type CalculationRequest, type StoredAssayDefinition } from '@/schemas/assay';
import { assayCodes, type AssayCode } from '@/schemas/common';
import { parsePastedTrace } from '@/utils/pasted-trace';
import { usePreviewActivity } from '../api/preview-activity';
import { ResultSummary } from './result-summary';

const backgroundLabel: Record<string, string> = {
  inhibitor: 'Background trace (with inhibitor)',
  baseline: 'Background trace (baseline before the starting substrate)',
  none: 'Background trace (this assay subtracts none; optional)',
};

type Numbers = { pathlengthCm: string; reactionVolumeUl: string; sampleVolumeUl: string; proteinMgPerMl: string };

/**
 * Paste a total and a background trace, see the fitted lines over the readings, the activity and its flags,
 * and move the window. Every number comes back from the server's engine with its inputs.
 */
export function RateCheck({ definitions }: { definitions: StoredAssayDefinition[] }) {
  const [assay, setAssay] = useState<AssayCode>('CI');
  const [numbers, setNumbers] = useState<Numbers>({ pathlengthCm: '1', reactionVolumeUl: '1000', sampleVolumeUl: '10', proteinMgPerMl: '4' });
  const [totalText, setTotalText] = useState('');
  const [backgroundText, setBackgroundText] = useState('');
  const [manual, setManual] = useState(false);
  const [window, setWindow] = useState({ fromS: '', toS: '' });
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const preview = usePreviewActivity();
  const definition = definitions.find((d) => d.definition.code === assay)?.definition;

  const total = useMemo(() => (totalText.trim() ? parsePastedTrace(totalText, 'Total trace') : null), [totalText]);
  const background = useMemo(() => (backgroundText.trim() ? parsePastedTrace(backgroundText, 'Background trace') : null), [backgroundText]);

  function buildRequest(win = window, byHand = manual): CalculationRequest | null {
    const errors: Record<string, string> = {};
    if (!total) errors.total = 'Paste the total trace';
    else if (total.error) errors.total = total.error;
    if (background?.error) errors.background = background.error;
    const candidate = {
      assay,
      pathlengthCm: Number(numbers.pathlengthCm),
      reactionVolumeUl: Number(numbers.reactionVolumeUl),
      sampleVolumeUl: Number(numbers.sampleVolumeUl),
      proteinMgPerMl: Number(numbers.proteinMgPerMl),
      total: total?.points ?? [],
      ...(background?.points ? { background: background.points } : {}),
      ...(byHand ? { window: { fromS: Number(win.fromS), toS: Number(win.toS) } } : {}),
    };
    const parsed = calculationRequestSchema.safeParse(candidate);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) errors[issue.path.join('.')] ??= besideField(issue.path.join('.'), issue.message);
    }
    setFieldErrors(errors);
    return Object.keys(errors).length === 0 && parsed.success ? parsed.data : null;
  }

  // What the shown result was computed from (the window apart: moving it recomputes at once).
  const inputsKey = JSON.stringify([assay, numbers, totalText, backgroundText]);
  const [resultInputs, setResultInputs] = useState<string | null>(null);

  function run(win = window, byHand = manual) {
    const request = buildRequest(win, byHand);
    if (!request) {
      // No figures are left on screen beside readings they were not computed from.
      preview.reset();
      return;
    }
    setResultInputs(inputsKey);
    preview.mutate(request, {
      onSuccess: (result) => {
        if (!byHand && result.window) setWindow({ fromS: String(result.window.fromS), toS: String(result.window.toS) });
      },
      onError: (err) => {
        if (err instanceof ApiError) setFieldErrors(Object.fromEntries(Object.entries(err.fields).map(([field, message]) => [field, besideField(field, message)])));
      },
    });
  }

  // Once a calculation has been asked for, moving the window recomputes at once, as long as both ends are numbers
  // in order. (Not "once a result is shown": while the previous recomputation is still on its way there is no
  // result, and an end typed then was dropped, leaving the old window's figures on screen.)
  const calculated = preview.data !== undefined || preview.isPending || preview.isError;
  function moveWindow(next: { fromS: string; toS: string }) {
    setWindow(next);
    if (calculated && next.fromS !== '' && next.toS !== '' && Number(next.toS) > Number(next.fromS)) run(next, true);
  }

  const result = preview.data;
  const stale = result !== undefined && resultInputs !== inputsKey;
  const setNumber = (key: keyof Numbers) => (e: React.ChangeEvent<HTMLInputElement>) => setNumbers((n) => ({ ...n, [key]: e.target.value }));

  return (
    <div className="grid gap-6 xl:grid-cols-[minmax(0,5fr)_minmax(0,6fr)]">
      <Card title="Readings and conditions">
        <form
          noValidate
          className="flex flex-col gap-4"
          onSubmit={(e) => {
            e.preventDefault();
            run();
          }}
        >
          <SelectField
            label="Assay"
            value={assay}
            onChange={(e) => setAssay(e.target.value as AssayCode)}
            options={assayCodes.map((c) => ({ value: c, label: definitions.find((d) => d.definition.code === c)?.definition.name ?? c }))}
            error={fieldErrors.assay}
            hint={definition ? `${definition.wavelengthNm} nm, ${definition.chromophore}, absorbance ${definition.direction}; definition v${definition.version}` : undefined}
          />
          <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
            <TextField label="Pathlength (cm)" inputMode="decimal" value={numbers.pathlengthCm} onChange={setNumber('pathlengthCm')} error={fieldErrors.pathlengthCm} />
            <TextField label="Reaction volume (µL)" inputMode="decimal" value={numbers.reactionVolumeUl} onChange={setNumber('reactionVolumeUl')} error={fieldErrors.reactionVolumeUl} />
            <TextField label="Sample volume (µL)" inputMode="decimal" value={numbers.sampleVolumeUl} onChange={setNumber('sampleVolumeUl')} error={fieldErrors.sampleVolumeUl} />
            <TextField label="Protein (mg/mL)" inputMode="decimal" value={numbers.proteinMgPerMl} onChange={setNumber('proteinMgPerMl')} error={fieldErrors.proteinMgPerMl} />
          </div>
          <TextArea
            label="Total trace (time in s, absorbance; one reading per line)"
            className="min-h-36 w-full rounded-md border border-paper-line bg-paper-raised px-2.5 py-1.5 font-mono text-xs"
            value={totalText}
            onChange={(e) => setTotalText(e.target.value)}
            error={fieldErrors.total}
            placeholder={'0\t1.200\n10\t1.194\n20\t1.188'}
          />
          <TextArea
            label={backgroundLabel[definition?.background ?? 'inhibitor']!}
            className="min-h-28 w-full rounded-md border border-paper-line bg-paper-raised px-2.5 py-1.5 font-mono text-xs"
            value={backgroundText}
            onChange={(e) => setBackgroundText(e.target.value)}
            error={fieldErrors.background}
          />
          <fieldset className="rounded-md border border-paper-line p-3">
            <legend className="px-1 text-sm font-medium text-ink-soft">Fitted window</legend>
            <div className="flex flex-wrap items-end gap-3">
              <label className="flex items-center gap-2 text-sm">
                <input
                  type="checkbox"
                  checked={manual}
                  onChange={(e) => {
                    setManual(e.target.checked);
                    if (calculated) run(window, e.target.checked);
                  }}
                />
                Set the window by hand
              </label>
              <div className="w-28">
                <TextField label="From (s)" inputMode="decimal" disabled={!manual} value={window.fromS} onChange={(e) => moveWindow({ ...window, fromS: e.target.value })} error={fieldErrors['window.fromS']} />
              </div>
              <div className="w-28">
                <TextField label="To (s)" inputMode="decimal" disabled={!manual} value={window.toS} onChange={(e) => moveWindow({ ...window, toS: e.target.value })} error={fieldErrors['window.toS'] ?? fieldErrors.window} />
              </div>
            </div>
            {!manual ? (
              <p className="mt-2 text-xs text-ink-faint">
                Automatic: the longest straight stretch of at least {definition?.minPoints ?? '—'} readings (its rate changing by no more than {definition?.curvatureLimitPct ?? '—'}% from start to end), starting after any slower opening within the first {definition?.lagMaxS ?? '—'} s. A reading far off its neighbours (a bubble) is not allowed to straighten or bend a stretch, and it keeps to one side of readings that jump to another level part-way. When no stretch is straight, no rate is given.
              </p>
            ) : null}
          </fieldset>
          <div>
            <Button type="submit" disabled={preview.isPending}>
              {preview.isPending ? 'Calculating…' : 'Calculate'}
            </Button>
          </div>
          {preview.error && !(preview.error instanceof ApiError && Object.keys(preview.error.fields).length) ? (
            <Notice tone="error">{preview.error.message}</Notice>
          ) : null}
        </form>
      </Card>
      <div className="flex flex-col gap-6">
        <Card title="Readings and fitted lines">
          {result && !stale ? (
            <TraceChart
              label="Absorbance against time with the fitted window"
              window={result.window}
              series={[
                { name: 'Total', points: total?.points ?? [], fit: result.fitTotal, color: '#1f5c51' },
                ...(background?.points ? [{ name: 'Background', points: background.points, fit: result.fitBackground, color: '#b8682f' }] : []),
              ]}
            />
          ) : (
            <p className="text-sm text-ink-faint">Paste the readings and press Calculate to see them here.</p>
          )}
        </Card>
        {result && stale ? (
          <Notice>The readings or conditions have changed since this result was calculated: press Calculate to see the result for what is entered now.</Notice>
        ) : null}
        {result && !stale ? <ResultSummary result={result} /> : null}
      </div>
    </div>
  );
}
