import { useState } from 'react';
import { TraceChart } from '@/components/charts/trace-chart';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { updateMeasurementInputSchema, type Measurement, type UpdateMeasurementInput } from '@/schemas/measurement';
import { useUpdateMeasurement } from '../api/save-measurement';
import { fmt } from '../utils/format';
import { ConditionFields, RateFields, WindowFields } from './entry-fields';

const numberOrNaN = (s: string) => (s.trim() === '' ? Number.NaN : Number(s));
const text = (v: number | null | undefined) => (v === null || v === undefined ? '' : String(v));

/** What a form opened under one row of the bench table receives. */
export type RowFormProps = { caseId: number; m: Measurement; onDone: (text: string) => void; onCancel: () => void };

/**
 * Changing a saved measurement: its replicate number, the cuvette conditions and typed rates, or the fitted
 * window. The server computes it again with the current assay definition and keeps the old values in the
 * audit trail. Readings stay as saved (paste them as a new replicate to replace them).
 */
export function MeasurementEditForm({ caseId, m, onDone, onCancel }: RowFormProps) {
  const inputs = m.inputs;
  const [replicate, setReplicate] = useState(String(m.replicate));
  const [pathlength, setPathlength] = useState(text(inputs.pathlengthCm));
  const [reaction, setReaction] = useState(text(inputs.reactionVolumeUl));
  const [sample, setSample] = useState(text(inputs.sampleVolumeUl));
  const [total, setTotal] = useState(inputs.mode === 'rates' ? text(inputs.totalRatePerMin) : '');
  const [background, setBackground] = useState(inputs.mode === 'rates' ? text(inputs.backgroundRatePerMin) : '');
  const w = inputs.mode === 'rates' ? null : inputs.window;
  const [fromS, setFromS] = useState(text(w?.fromS));
  const [toS, setToS] = useState(text(w?.toS));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const update = useUpdateMeasurement(caseId);

  function build(): UpdateMeasurementInput | null {
    const common = { replicate: numberOrNaN(replicate), version: m.version };
    const conditions = { pathlengthCm: numberOrNaN(pathlength), reactionVolumeUl: numberOrNaN(reaction), sampleVolumeUl: numberOrNaN(sample) };
    const window = fromS.trim() === '' && toS.trim() === '' ? null : { fromS: numberOrNaN(fromS), toS: numberOrNaN(toS) };
    let candidate: unknown;
    if (inputs.mode === 'rates') {
      candidate = {
        mode: 'rates',
        ...common,
        ...conditions,
        totalRatePerMin: numberOrNaN(total),
        backgroundRatePerMin: background.trim() === '' ? null : numberOrNaN(background),
      };
    } else if (inputs.mode === 'traces') {
      candidate = { mode: 'traces', ...common, ...conditions, total: inputs.total, background: inputs.background, window };
    } else {
      candidate = { mode: 'plate', ...common, window };
    }
    const parsed = updateMeasurementInputSchema.safeParse(candidate);
    const found: Record<string, string> = {};
    if (!parsed.success) for (const issue of parsed.error.issues) found[issue.path.map(String).join('.')] ??= issue.message;
    setErrors(found);
    setFormError(null);
    return parsed.success ? parsed.data : null;
  }

  return (
    <form
      className="flex flex-col gap-3 rounded-md border border-paper-line bg-paper p-3"
      aria-label={`Change ${m.assay} replicate ${m.replicate}`}
      onSubmit={(e) => {
        e.preventDefault();
        const input = build();
        if (!input) return;
        update.mutate(
          { id: m.id, input },
          {
            onSuccess: (after) =>
              onDone(
                `${after.assay} replicate ${after.replicate} saved: ${after.activity === null ? 'no activity (see flags)' : `${fmt(after.activity)} ${after.result.unit}`}.`,
              ),
            onError: (err) => {
              if (err instanceof ApiError) {
                setErrors(err.fields);
                setFormError(err.message);
              } else setFormError('Not saved');
            },
          },
        );
      }}
    >
      <div className="grid gap-3 sm:grid-cols-4">
        <TextField label="Replicate" inputMode="numeric" value={replicate} onChange={(e) => setReplicate(e.target.value)} error={errors.replicate} />
        {inputs.mode !== 'plate' ? (
          <ConditionFields pathlength={[pathlength, setPathlength]} reaction={[reaction, setReaction]} sample={[sample, setSample]} errors={errors} />
        ) : null}
      </div>
      {inputs.mode === 'rates' ? (
        <RateFields total={[total, setTotal]} background={[background, setBackground]} errors={errors} />
      ) : (
        <>
          {/* The saved readings, so the window is chosen by eye: shaded is the window the saved result used. */}
          <TraceChart
            label={`${m.assay} replicate ${m.replicate}: saved readings`}
            height={200}
            window={m.result.window}
            series={[
              { name: 'total', points: inputs.total, fit: m.result.fitTotal, color: '#184a42' },
              ...(inputs.background ? [{ name: 'background', points: inputs.background, fit: m.result.fitBackground, color: '#b8682f' }] : []),
            ]}
          />
          <WindowFields
            fromS={[fromS, setFromS]}
            toS={[toS, setToS]}
            errors={errors}
            note={`Shaded: the window of the saved result${m.result.window ? ` (${fmt(m.result.window.fromS)}–${fmt(m.result.window.toS)} s)` : ''}. Leave both empty for the automatic window. The readings stay as saved.`}
          />
        </>
      )}
      {formError ? (
        <Notice tone="error" focus>
          {formError}
        </Notice>
      ) : null}
      <div className="flex gap-2">
        <Button type="submit" disabled={update.isPending}>
          Save changes
        </Button>
        <Button variant="quiet" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
