import { useEffect, useRef, useState } from 'react';
import { TraceChart } from '@/components/charts/trace-chart';
import { Button } from '@/components/ui/button';
import { SelectField, TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { assayCodes, type AssayCode } from '@/schemas/common';
import { createMeasurementInputSchema, parsePastedReadings, type CreateMeasurementInput, type WorkupSpecimen } from '@/schemas/measurement';
import { useCreateMeasurement, usePreviewMeasurement, type MeasurementPreview } from '../api/save-measurement';
import { readEntryDraft, writeEntryDraft } from '../utils/entry-draft';
import { fmt } from '../utils/format';
import { nextFreeReplicate } from '../utils/next-replicate';
import { ConditionFields, RateFields, WindowFields } from './entry-fields';
import { ResultLine } from '@/components/plate/result-line';

type Mode = 'rates' | 'traces';
const numberOrNaN = (s: string) => (s.trim() === '' ? Number.NaN : Number(s));

type SavedKey = { specimenId: number; assay: string; replicate: number };

/**
 * Typing the rates read off the instrument, or pasting the readings themselves, for one replicate of one assay.
 * "Check" computes on the server without saving; "Save" stores the measurement. The replicate number follows
 * the specimen and assay chosen (the next one not yet saved); pasted text survives a reload until it is saved.
 */
export function ManualEntry({ caseId, specimens, mode, saved: savedKeys = [] }: { caseId: number; specimens: WorkupSpecimen[]; mode: Mode; saved?: SavedKey[] }) {
  const ready = specimens.filter((s) => s.accepted && s.proteinMgPerMl !== null);
  const [draft] = useState(() => readEntryDraft(caseId, mode));
  const [specimenId, setSpecimenId] = useState(draft?.specimenId ?? ready[0]?.id ?? 0);
  const [assay, setAssay] = useState<AssayCode>((draft?.assay as AssayCode | undefined) ?? 'CS');
  const [replicate, setReplicate] = useState(draft?.replicate ?? String(nextFreeReplicate(savedKeys, ready[0]?.id ?? 0, 'CS')));
  const [pathlength, setPathlength] = useState('1');
  const [reaction, setReaction] = useState('1000');
  const [sample, setSample] = useState('20');
  const [total, setTotal] = useState(draft?.total ?? '');
  const [background, setBackground] = useState(draft?.background ?? '');
  const [fromS, setFromS] = useState(draft?.fromS ?? '');
  const [toS, setToS] = useState(draft?.toS ?? '');
  const saving = useRef(false);
  const unsaved = mode === 'traces' && (total.trim() !== '' || background.trim() !== '');
  // Keep the pasted text for a reload, and ask before the tab is closed or left with it unsaved.
  useEffect(() => {
    if (mode !== 'traces') return;
    writeEntryDraft(caseId, mode, { specimenId, assay, replicate, total, background, fromS, toS });
  }, [caseId, mode, specimenId, assay, replicate, total, background, fromS, toS]);
  useEffect(() => {
    if (!unsaved) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [unsaved]);
  const choose = (nextSpecimen: number, nextAssay: AssayCode) => {
    setSpecimenId(nextSpecimen);
    setAssay(nextAssay);
    setReplicate(String(nextFreeReplicate(savedKeys, nextSpecimen, nextAssay)));
  };
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [checked, setChecked] = useState<{ input: CreateMeasurementInput; preview: MeasurementPreview } | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const preview = usePreviewMeasurement(caseId);
  const create = useCreateMeasurement(caseId);

  if (ready.length === 0) {
    return <Notice>Record the protein of an accepted specimen first: every activity is per mg of protein.</Notice>;
  }

  function build(): CreateMeasurementInput | null {
    const found: Record<string, string> = {};
    const common = {
      specimenId,
      assay,
      replicate: numberOrNaN(replicate),
      pathlengthCm: numberOrNaN(pathlength),
      reactionVolumeUl: numberOrNaN(reaction),
      sampleVolumeUl: numberOrNaN(sample),
    };
    let candidate: unknown;
    if (mode === 'rates') {
      candidate = { ...common, mode, totalRatePerMin: numberOrNaN(total), backgroundRatePerMin: background.trim() === '' ? null : numberOrNaN(background) };
    } else {
      const t = parsePastedReadings(total);
      const b = background.trim() === '' ? null : parsePastedReadings(background);
      if (t.problems.length) found.total = t.problems.map((p) => p.message).join('; ');
      if (b?.problems.length) found.background = b.problems.map((p) => p.message).join('; ');
      const window = fromS.trim() === '' && toS.trim() === '' ? null : { fromS: numberOrNaN(fromS), toS: numberOrNaN(toS) };
      candidate = { ...common, mode, total: t.points, background: b ? b.points : null, window };
    }
    const parsed = createMeasurementInputSchema.safeParse(candidate);
    if (!parsed.success) for (const issue of parsed.error.issues) found[issue.path.map(String).join('.')] ??= issue.message;
    setErrors(found);
    setFormError(null);
    return Object.keys(found).length === 0 && parsed.success ? parsed.data : null;
  }

  const onServerError = (err: unknown) => {
    setSaved(null);
    if (err instanceof ApiError) {
      setErrors(err.fields);
      setFormError(err.message);
    } else setFormError('The measurement could not be computed');
  };

  const label = (id: number) => ready.find((s) => s.id === id)?.label ?? String(id);

  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6">
        <SelectField
          label="Specimen"
          value={String(specimenId)}
          onChange={(e) => choose(Number(e.target.value), assay)}
          options={ready.map((s) => ({ value: String(s.id), label: `${s.label} (${fmt(s.proteinMgPerMl)} mg/mL)` }))}
          error={errors.specimenId}
        />
        <SelectField label="Assay" value={assay} onChange={(e) => choose(specimenId, e.target.value as AssayCode)} options={assayCodes.map((a) => ({ value: a, label: a }))} />
        <TextField
          label="Replicate"
          inputMode="numeric"
          value={replicate}
          onChange={(e) => setReplicate(e.target.value)}
          error={errors.replicate}
          hint={errors.replicate ? undefined : `Next free: ${nextFreeReplicate(savedKeys, specimenId, assay)}`}
        />
        <ConditionFields pathlength={[pathlength, setPathlength]} reaction={[reaction, setReaction]} sample={[sample, setSample]} errors={errors} />
      </div>
      {mode === 'rates' ? (
        <RateFields total={[total, setTotal]} background={[background, setBackground]} errors={errors} />
      ) : (
        <>
          <div className="grid gap-3 md:grid-cols-2">
            <TextArea label="Total readings (time in s, absorbance)" value={total} onChange={(e) => setTotal(e.target.value)} error={errors.total} placeholder={'0\t0.912\n15\t0.905\n30\t0.897'} />
            <TextArea label="Background readings (optional)" value={background} onChange={(e) => setBackground(e.target.value)} error={errors.background} placeholder="Same layout" />
          </div>
          <WindowFields
            fromS={[fromS, setFromS]}
            toS={[toS, setToS]}
            errors={errors}
            note="Leave both empty for the automatic window: the longest early stretch whose r² reaches the definition's threshold."
          />
        </>
      )}
      {draft && unsaved && !saved ? (
        <Notice>Readings pasted before the page was reloaded are back below; they are not saved yet.</Notice>
      ) : null}
      {formError ? (
        <Notice tone="error" focus>
          {formError}
        </Notice>
      ) : null}
      {saved ? (
        <Notice tone="success" focus>
          {saved}
        </Notice>
      ) : null}
      <div className="flex gap-2">
        <Button
          variant="secondary"
          disabled={preview.isPending}
          onClick={() => {
            setSaved(null);
            // The last result goes as soon as the inputs change to ones that fail, so no stale number stays beside an error.
            setChecked(null);
            const input = build();
            if (input) preview.mutate(input, { onSuccess: (p) => setChecked({ input, preview: p }), onError: onServerError });
          }}
        >
          Check
        </Button>
        <Button
          disabled={create.isPending}
          onClick={() => {
            // A second click before the first answer saves nothing twice (the button's disabled state lags a tick).
            if (saving.current) return;
            setSaved(null);
            setChecked(null);
            const input = build();
            if (!input) return;
            saving.current = true;
            create.mutate(input, {
              onSettled: () => {
                saving.current = false;
              },
              onSuccess: (m) => {
                setSaved(`Saved ${m.assay} replicate ${m.replicate} of specimen ${label(m.specimenId)}: ${m.activity === null ? 'no activity (see flags)' : `${fmt(m.activity)} ${m.result.unit}`}.`);
                setChecked(null);
                setTotal('');
                setBackground('');
                setReplicate(String(nextFreeReplicate([...savedKeys, m], m.specimenId, m.assay)));
                setFromS('');
                setToS('');
              },
              onError: onServerError,
            });
          }}
        >
          {create.isPending ? 'Saving…' : 'Save measurement'}
        </Button>
      </div>
      {checked ? (
        <div className="grid gap-4 rounded-md border border-paper-line p-3 lg:grid-cols-[3fr_2fr]">
          {checked.input.mode === 'traces' ? (
            <TraceChart
              label={`${checked.input.assay} readings`}
              window={checked.preview.result.window}
              series={[
                { name: 'total', points: checked.input.total, fit: checked.preview.result.fitTotal, color: '#184a42' },
                ...(checked.input.background
                  ? [{ name: 'background', points: checked.input.background, fit: checked.preview.result.fitBackground, color: '#b8682f' }]
                  : []),
              ]}
            />
          ) : (
            <p className="text-sm text-ink-soft">Typed rates: no readings to plot.</p>
          )}
          <ResultLine result={checked.preview.result} />
        </div>
      ) : null}
    </div>
  );
}
