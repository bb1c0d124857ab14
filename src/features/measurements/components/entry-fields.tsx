import { TextField } from '@/components/ui/field';

/** One text input's value and setter, as useState gives them. */
export type FieldState = [string, (value: string) => void];

/** Pathlength and the two volumes of the cuvette or well (a fragment: the caller lays out the grid). */
export function ConditionFields({
  pathlength: [pathlength, setPathlength],
  reaction: [reaction, setReaction],
  sample: [sample, setSample],
  errors,
}: {
  pathlength: FieldState;
  reaction: FieldState;
  sample: FieldState;
  errors: Record<string, string>;
}) {
  return (
    <>
      <TextField label="Pathlength (cm)" inputMode="decimal" value={pathlength} onChange={(e) => setPathlength(e.target.value)} error={errors.pathlengthCm} />
      <TextField label="Reaction volume (µL)" inputMode="decimal" value={reaction} onChange={(e) => setReaction(e.target.value)} error={errors.reactionVolumeUl} />
      <TextField label="Sample volume (µL)" inputMode="decimal" value={sample} onChange={(e) => setSample(e.target.value)} error={errors.sampleVolumeUl} />
    </>
  );
}

/** The total and background rates read off the instrument. */
export function RateFields({ total: [total, setTotal], background: [background, setBackground], errors }: { total: FieldState; background: FieldState; errors: Record<string, string> }) {
  return (
    <div className="grid gap-3 sm:grid-cols-2">
      <TextField label="Total rate (ΔA/min)" inputMode="decimal" value={total} onChange={(e) => setTotal(e.target.value)} error={errors.totalRatePerMin} hint="Signed: a falling absorbance is negative." />
      <TextField
        label="Background rate (ΔA/min)"
        inputMode="decimal"
        value={background}
        onChange={(e) => setBackground(e.target.value)}
        error={errors.backgroundRatePerMin}
        hint="With the inhibitor, or before the starting substrate; empty when the assay subtracts nothing."
      />
    </div>
  );
}

/** The fitted window by hand, or both empty for the automatic one. */
export function WindowFields({ fromS: [fromS, setFromS], toS: [toS, setToS], errors, note }: { fromS: FieldState; toS: FieldState; errors: Record<string, string>; note: string }) {
  return (
    <div className="grid gap-3 sm:grid-cols-[10rem_10rem_1fr]">
      <TextField label="Window from (s)" inputMode="decimal" value={fromS} onChange={(e) => setFromS(e.target.value)} error={errors['window.fromS'] ?? errors['window.toS'] ?? errors.window} />
      <TextField label="Window to (s)" inputMode="decimal" value={toS} onChange={(e) => setToS(e.target.value)} />
      <p className="self-end pb-2 text-xs text-ink-faint">{note}</p>
    </div>
  );
}
