import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { ApiError } from '@/lib/api-client';
import { excludeMeasurementInputSchema } from '@/schemas/measurement';
import { useExcludeMeasurement } from '../api/exclude-measurement';
import type { RowFormProps } from './measurement-edit-form';

/**
 * Leaving one replicate out of the means, ratios and pattern, with the reason (it is printed in the report's
 * methods section). The replicate stays on the bench and on the results, struck through.
 */
export function ExcludeForm({ caseId, m, onDone, onCancel }: RowFormProps) {
  const [reason, setReason] = useState('');
  const [error, setError] = useState<string | undefined>();
  const exclude = useExcludeMeasurement(caseId);
  return (
    <form
      className="flex flex-wrap items-end gap-2 rounded-md border border-caution/40 bg-paper p-2"
      aria-label={`Exclude ${m.assay} replicate ${m.replicate}`}
      onSubmit={(e) => {
        e.preventDefault();
        const parsed = excludeMeasurementInputSchema.safeParse({ reason, version: m.version });
        if (!parsed.success) {
          setError(parsed.error.issues.find((i) => i.path[0] === 'reason')?.message ?? parsed.error.issues[0]?.message);
          return;
        }
        exclude.mutate(
          { id: m.id, input: parsed.data },
          {
            onSuccess: (after) => onDone(`${after.assay} replicate ${after.replicate} is excluded from the results: ${after.excluded?.reason ?? ''}.`),
            onError: (err) => setError(err instanceof ApiError ? (err.fields.reason ?? err.message) : 'Not saved'),
          },
        );
      }}
    >
      <div className="min-w-64 flex-1">
        <TextField
          label={`Why exclude ${m.assay} replicate ${m.replicate}?`}
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          error={error}
          hint="Printed on the report beside the replicate, e.g. an air bubble in the cuvette."
          maxLength={300}
        />
      </div>
      <Button type="submit" disabled={exclude.isPending}>
        Exclude replicate
      </Button>
      <Button variant="quiet" onClick={onCancel}>
        Cancel
      </Button>
    </form>
  );
}
