import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { updateMeasurementInputSchema, type Measurement, type UpdateMeasurementInput } from '@/schemas/measurement';
import { useUpdateMeasurement } from '../api/save-measurement';
import { fmt } from '../utils/format';

const numberOrNaN = (s: string) => (s.trim() === '' ? Number.NaN : Number(s));
const text = (v: number | null | undefined) => (v === null || v === undefined ? '' : String(v));

/**
 * Changing a saved measurement: its replicate number, the cuvette conditions and typed rates, or the fitted
 * window. The server computes it again with the current assay definition and keeps the old values in the
 * audit trail. Readings stay as saved (paste them as a new replicate to replace them).
 */
export function MeasurementEditForm({
  caseId,
  m,
  onDone,
  onCancel,
}: {
  caseId: number;
  m: Measurement;
  onDone: (text: string) => void;
  onCancel: () => void;
}) {
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

  const windowError = errors['window.fromS'] ?? errors['window.toS'] ?? errors.window;
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
          <>
            <TextField label="Pathlength (cm)" inputMode="decimal" value={pathlength} onChange={(e) => setPathlength(e.target.value)} error={errors.pathlengthCm} />
            <TextField label="Reaction volume (µL)" inputMode="decimal" value={reaction} onChange={(e) => setReaction(e.target.value)} error={errors.reactionVolumeUl} />
            <TextField label="Sample volume (µL)" inputMode="decimal" value={sample} onChange={(e) => setSample(e.target.value)} error={errors.sampleVolumeUl} />
          </>
        ) : null}
      </div>
      {inputs.mode === 'rates' ? (
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField label="Total rate (ΔA/min)" inputMode="decimal" value={total} onChange={(e) => setTotal(e.target.value)} error={errors.totalRatePerMin} />
          <TextField
            label="Background rate (ΔA/min)"
            inputMode="decimal"
            value={background}
            onChange={(e) => setBackground(e.target.value)}
            error={errors.backgroundRatePerMin}
            hint="Empty when the assay subtracts nothing."
          />
        </div>
      ) : (
        <div className="grid gap-3 sm:grid-cols-[10rem_10rem_1fr]">
          <TextField label="Window from (s)" inputMode="decimal" value={fromS} onChange={(e) => setFromS(e.target.value)} error={windowError} />
          <TextField label="Window to (s)" inputMode="decimal" value={toS} onChange={(e) => setToS(e.target.value)} />
          <p className="self-end pb-2 text-xs text-ink-faint">Leave both empty for the automatic window. The readings stay as saved.</p>
        </div>
      )}
      {formError ? <Notice tone="error">{formError}</Notice> : null}
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
