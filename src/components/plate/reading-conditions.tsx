import { SelectField, TextField } from '@/components/ui/field';
import type { PlatePathlengthInput } from '@/schemas/measurement';

/** The conditions a plate was read under, as typed (text until sent). */
export type ReadingConditions = {
  pathMode: 'fill' | 'given';
  fillUl: string;
  areaCm2: string;
  givenCm: string;
  reactionUl: string;
  sampleUl: string;
};

/** The upload screens' starting values: 200 µL in a 0.32 cm² well, 200 µL reaction with 10 µL of sample. */
export const defaultReadingConditions: ReadingConditions = { pathMode: 'fill', fillUl: '200', areaCm2: '0.32', givenCm: '0.6', reactionUl: '200', sampleUl: '10' };

/** The plan fields the conditions give (the server checks them and names any bad one). */
export function conditionsPlan(c: ReadingConditions): { pathlength: PlatePathlengthInput; reactionVolumeUl: number; sampleVolumeUl: number } {
  return {
    pathlength: c.pathMode === 'fill' ? { mode: 'fill', volumeUl: Number(c.fillUl), wellAreaCm2: Number(c.areaCm2) } : { mode: 'given', cm: Number(c.givenCm) },
    reactionVolumeUl: Number(c.reactionUl),
    sampleVolumeUl: Number(c.sampleUl),
  };
}

export function ReadingConditionsFields({ value: c, onChange, errors = {} }: { value: ReadingConditions; onChange: (c: ReadingConditions) => void; errors?: Record<string, string | undefined> }) {
  const set = (patch: Partial<ReadingConditions>) => onChange({ ...c, ...patch });
  return (
    <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6">
      <SelectField
        label="Pathlength"
        value={c.pathMode}
        onChange={(e) => set({ pathMode: e.target.value as 'fill' | 'given' })}
        options={[
          { value: 'fill', label: 'From the fill volume' },
          { value: 'given', label: 'Measured (cm)' },
        ]}
      />
      {c.pathMode === 'fill' ? (
        <>
          <TextField label="Fill volume (µL)" inputMode="decimal" value={c.fillUl} onChange={(e) => set({ fillUl: e.target.value })} error={errors['pathlength.volumeUl']} />
          <TextField label="Well area (cm²)" inputMode="decimal" value={c.areaCm2} onChange={(e) => set({ areaCm2: e.target.value })} error={errors['pathlength.wellAreaCm2']} />
        </>
      ) : (
        <TextField label="Pathlength (cm)" inputMode="decimal" value={c.givenCm} onChange={(e) => set({ givenCm: e.target.value })} error={errors['pathlength.cm']} />
      )}
      <TextField label="Reaction volume (µL)" inputMode="decimal" value={c.reactionUl} onChange={(e) => set({ reactionUl: e.target.value })} error={errors.reactionVolumeUl} />
      <TextField label="Sample volume (µL)" inputMode="decimal" value={c.sampleUl} onChange={(e) => set({ sampleUl: e.target.value })} error={errors.sampleVolumeUl} />
    </div>
  );
}
