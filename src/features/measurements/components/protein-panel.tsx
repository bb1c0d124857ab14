import { useState } from 'react';
import { CartesianGrid, ComposedChart, Line, ResponsiveContainer, Scatter, XAxis, YAxis } from 'recharts';
import { Button } from '@/components/ui/button';
import { SelectField, TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import {
  proteinCurveInputSchema,
  type ProteinCurveInput,
  type ProteinCurveResult,
  type WorkupSpecimen,
} from '@/schemas/measurement';
import { usePreviewProteinCurve, useSaveProtein } from '../api/save-protein';
import { fmt } from '../utils/format';
import { parseNumberList, parseNumberPairs } from '../utils/paste';
import { FlagList } from '@/components/ui/flag-list';

function CurveChart({ input, result }: { input: ProteinCurveInput; result: ProteinCurveResult }) {
  if (result.c0 === null || result.c1 === null) return null;
  const { c0, c1 } = result;
  const c2 = result.c2 ?? 0;
  const hi = Math.max(...input.standards.map((s) => s.concentrationMgPerMl));
  const curve = Array.from({ length: 21 }, (_, i) => {
    const x = (hi * i) / 20;
    return { c: x, a: c0 + c1 * x + c2 * x * x };
  });
  const points = input.standards.map((s) => ({ c: s.concentrationMgPerMl, a: s.absorbance }));
  const unknown = result.readMgPerMl !== null && result.meanAbsorbance !== null ? [{ c: result.readMgPerMl, a: result.meanAbsorbance }] : [];
  return (
    <figure aria-label="Protein standard curve" className="w-full">
      <ResponsiveContainer width="100%" height={200}>
        <ComposedChart margin={{ top: 8, right: 12, bottom: 18, left: 4 }}>
          <CartesianGrid stroke="#e4e0d6" strokeDasharray="3 3" />
          <XAxis type="number" dataKey="c" domain={[0, 'dataMax']} tick={{ fontSize: 11 }} label={{ value: 'mg/mL', position: 'insideBottom', offset: -10, fontSize: 11 }} />
          <YAxis type="number" dataKey="a" tick={{ fontSize: 11 }} width={48} tickFormatter={(v: number) => v.toFixed(2)} />
          <Line data={curve} dataKey="a" stroke="#184a42" dot={false} strokeWidth={2} isAnimationActive={false} />
          <Scatter name="standards" data={points} fill="#1f5c51" isAnimationActive={false} />
          <Scatter name="specimen" data={unknown} fill="#b8682f" shape="diamond" isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
      <figcaption className="text-xs text-ink-faint">Standards (dots), fitted curve (line) and the diluted specimen read off it (diamond).</figcaption>
    </figure>
  );
}

const exampleStandards = 'mg/mL\tabsorbance\n0\t0.057\n0.25\t0.187\n0.5\t0.316\n1\t0.574\n1.5\t0.829';

function CurveForm({ caseId, specimen, onSaved }: { caseId: number; specimen: WorkupSpecimen; onSaved: (text: string) => void }) {
  const previous = specimen.proteinDetails?.input;
  const [method, setMethod] = useState(previous?.method ?? 'BCA');
  const [model, setModel] = useState<ProteinCurveInput['model']>(previous?.model ?? 'linear');
  const [standardsText, setStandardsText] = useState(
    previous ? previous.standards.map((s) => `${s.concentrationMgPerMl}\t${s.absorbance}`).join('\n') : '',
  );
  const [unknownText, setUnknownText] = useState(previous ? previous.unknownAbsorbances.join(', ') : '');
  const [dilution, setDilution] = useState(String(previous?.dilutionFactor ?? 10));
  const [problems, setProblems] = useState<Record<string, string>>({});
  const [checked, setChecked] = useState<{ input: ProteinCurveInput; result: ProteinCurveResult } | null>(null);
  const preview = usePreviewProteinCurve();
  const save = useSaveProtein(caseId);

  function build(): ProteinCurveInput | null {
    const found: Record<string, string> = {};
    const standards = parseNumberPairs(standardsText);
    const unknowns = parseNumberList(unknownText);
    if (standards.problems.length) found.standards = standards.problems.join('; ');
    if (unknowns.problems.length) found.unknownAbsorbances = unknowns.problems.join('; ');
    const candidate = {
      method,
      model,
      standards: standards.pairs.map(([concentrationMgPerMl, absorbance]) => ({ concentrationMgPerMl, absorbance })),
      unknownAbsorbances: unknowns.values,
      dilutionFactor: dilution.trim() === '' ? Number.NaN : Number(dilution),
    };
    const parsed = proteinCurveInputSchema.safeParse(candidate);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) found[String(issue.path[0])] ??= issue.message;
    }
    setProblems(found);
    return Object.keys(found).length === 0 && parsed.success ? parsed.data : null;
  }

  const serverError = (err: unknown) => {
    if (err instanceof ApiError) setProblems({ ...err.fields, form: err.message });
    else setProblems({ form: 'The protein could not be saved' });
  };

  return (
    <div className="flex flex-col gap-3">
      <div className="grid gap-3 sm:grid-cols-3">
        <TextField label="Method" value={method} onChange={(e) => setMethod(e.target.value)} error={problems.method} />
        <SelectField
          label="Curve"
          value={model}
          onChange={(e) => setModel(e.target.value as ProteinCurveInput['model'])}
          options={[
            { value: 'linear', label: 'Straight line' },
            { value: 'quadratic', label: 'Quadratic (bends at the top)' },
          ]}
        />
        <TextField label="Dilution factor" inputMode="decimal" value={dilution} onChange={(e) => setDilution(e.target.value)} error={problems.dilutionFactor} hint="1 = undiluted" />
      </div>
      <TextArea
        label="Standards (concentration mg/mL, absorbance; one per line)"
        value={standardsText}
        onChange={(e) => setStandardsText(e.target.value)}
        placeholder={exampleStandards}
        error={problems.standards}
        hint="Paste two columns from a spreadsheet; a header line is skipped."
      />
      <TextField
        label="Specimen absorbance (one or more readings)"
        value={unknownText}
        onChange={(e) => setUnknownText(e.target.value)}
        placeholder="0.271, 0.276"
        error={problems.unknownAbsorbances}
      />
      {problems.form ? <Notice tone="error">{problems.form}</Notice> : null}
      <div className="flex gap-2">
        <Button
          variant="secondary"
          disabled={preview.isPending}
          onClick={() => {
            const input = build();
            if (input) preview.mutate(input, { onSuccess: (result) => setChecked({ input, result }), onError: serverError });
          }}
        >
          Check the curve
        </Button>
        <Button
          disabled={save.isPending}
          onClick={() => {
            const input = build();
            if (!input) return;
            save.mutate(
              { specimenId: specimen.id, input: { kind: 'curve', ...input, version: specimen.version } },
              { onSuccess: (s) => onSaved(`Protein of specimen ${s.label}: ${fmt(s.proteinMgPerMl)} mg/mL (${s.proteinSource}).`), onError: serverError },
            );
          }}
        >
          Save protein
        </Button>
      </div>
      {checked ? (
        <div className="grid gap-3 rounded-md border border-paper-line p-3 md:grid-cols-2">
          <CurveChart input={checked.input} result={checked.result} />
          <div className="flex flex-col gap-2 text-sm">
            <p>
              <span className="num text-2xl font-semibold text-matrix-900">{fmt(checked.result.mgPerMl)}</span> mg/mL in the homogenate
            </p>
            <p className="num text-ink-soft">
              read {fmt(checked.result.readMgPerMl)} mg/mL × dilution {checked.input.dilutionFactor}; r² {fmt(checked.result.r2, 5)}; standards{' '}
              {fmt(checked.result.lowestMgPerMl)}–{fmt(checked.result.highestMgPerMl)} mg/mL
            </p>
            <FlagList flags={checked.result.flags} />
          </div>
        </div>
      ) : null}
    </div>
  );
}

function DirectForm({ caseId, specimen, onSaved }: { caseId: number; specimen: WorkupSpecimen; onSaved: (text: string) => void }) {
  const [value, setValue] = useState('');
  const [source, setSource] = useState('');
  const [problems, setProblems] = useState<Record<string, string>>({});
  const save = useSaveProtein(caseId);
  return (
    <form
      noValidate
      className="grid gap-3 sm:grid-cols-[10rem_1fr_auto] sm:items-end"
      onSubmit={(e) => {
        e.preventDefault();
        save.mutate(
          { specimenId: specimen.id, input: { kind: 'direct', proteinMgPerMl: value.trim() === '' ? Number.NaN : Number(value), proteinSource: source, version: specimen.version } },
          {
            onSuccess: (s) => onSaved(`Protein of specimen ${s.label}: ${fmt(s.proteinMgPerMl)} mg/mL.`),
            onError: (err) => setProblems(err instanceof ApiError ? { ...err.fields, form: err.message } : { form: 'Not saved' }),
          },
        );
      }}
    >
      <TextField label="Protein (mg/mL)" inputMode="decimal" value={value} onChange={(e) => setValue(e.target.value)} error={problems.proteinMgPerMl} />
      <TextField label="How it was measured" value={source} onChange={(e) => setSource(e.target.value)} error={problems.proteinSource} placeholder="e.g. BCA read on the plate reader" />
      <Button type="submit" disabled={save.isPending}>
        Save protein
      </Button>
      {problems.form && !problems.proteinMgPerMl && !problems.proteinSource ? (
        <div className="sm:col-span-3">
          <Notice tone="error">{problems.form}</Notice>
        </div>
      ) : null}
    </form>
  );
}

/** A specimen's homogenate protein: what is recorded, and a way to record it (standard curve or typed value). */
export function ProteinPanel({ caseId, specimen, editable }: { caseId: number; specimen: WorkupSpecimen; editable: boolean }) {
  const [mode, setMode] = useState<'closed' | 'curve' | 'direct'>('closed');
  const [message, setMessage] = useState<string | null>(null);
  const onSaved = (text: string) => {
    setMessage(text);
    setMode('closed');
  };
  return (
    <div className="flex flex-col gap-3" data-testid={`protein-${specimen.label}`}>
      <div className="flex flex-wrap items-baseline justify-between gap-3">
        <p className="text-sm">
          <span className="font-medium">Specimen {specimen.label}</span>{' '}
          {specimen.proteinMgPerMl === null ? (
            <span className="text-caution">— protein not recorded yet; assays need it first.</span>
          ) : (
            <>
              — <span className="num font-semibold">{fmt(specimen.proteinMgPerMl)} mg/mL</span>{' '}
              <span className="text-ink-soft">({specimen.proteinSource})</span>
            </>
          )}
        </p>
        {editable ? (
          <div className="flex gap-1">
            <Button variant={mode === 'curve' ? 'secondary' : 'quiet'} onClick={() => setMode(mode === 'curve' ? 'closed' : 'curve')}>
              From standards
            </Button>
            <Button variant={mode === 'direct' ? 'secondary' : 'quiet'} onClick={() => setMode(mode === 'direct' ? 'closed' : 'direct')}>
              Type a value
            </Button>
          </div>
        ) : null}
      </div>
      {message ? <Notice tone="success">{message}</Notice> : null}
      {mode === 'curve' ? <CurveForm caseId={caseId} specimen={specimen} onSaved={onSaved} /> : null}
      {mode === 'direct' ? <DirectForm caseId={caseId} specimen={specimen} onSaved={onSaved} /> : null}
      {mode !== 'closed' && specimen.proteinMgPerMl !== null ? (
        <p className="text-xs text-ink-faint">Saving a new value computes this specimen&apos;s saved assays again with it.</p>
      ) : null}
    </div>
  );
}
