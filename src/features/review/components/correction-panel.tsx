import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useZodForm } from '@/lib/form';
import {
  DEFAULT_CORRECTION_MEANING,
  INTERPRETATION_MAX,
  correctFormSchema,
  signatureMeanings,
  type ReportDetail,
  type ReviewCase,
  type SignResult,
} from '@/schemas/report';
import { useCorrectReport } from '../api/correct-report';

/** Issues a corrected version: why, what changed, the (possibly edited) interpretation, and a new signature. */
export function CorrectionPanel({
  review,
  current,
  onCorrected,
}: {
  review: ReviewCase;
  current: ReportDetail;
  onCorrected: (r: SignResult) => void | Promise<void>;
}) {
  const [open, setOpen] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const form = useZodForm(correctFormSchema, {
    defaultValues: { interpretation: current.interpretation, meaning: DEFAULT_CORRECTION_MEANING, password: '', reason: '', changesSummary: '' },
  });
  const correct = useCorrectReport({ onDone: onCorrected });
  const { errors } = form.formState;
  // Reopened and submitted again: the results are new, so the signed wording may no longer fit them.
  const newResults = review.case.amendReason !== null;
  if (!open) {
    return (
      <Button variant="secondary" className="self-start" onClick={() => setOpen(true)}>
        {newResults ? 'Sign the corrected report…' : 'Correct the wording of the report…'}
      </Button>
    );
  }
  return (
    <form
      noValidate
      aria-label="Issue a corrected report"
      className="flex flex-col gap-3"
      onSubmit={form.handleSubmit((values) => {
        setFormError(null);
        correct.mutate(
          { caseId: review.case.id, input: { ...values, version: review.case.version } },
          {
            onError: (err) => {
              form.setValue('password', '');
              if (err instanceof ApiError && err.code === 'BAD_CREDENTIALS') form.setError('password', { type: 'server', message: err.message });
              else setFormError(applyServerError(form, err));
            },
          },
        );
      })}
    >
      <p className="text-sm text-ink-soft">
        Version {current.version + 1} will replace version {current.version}. Version {current.version} stays readable, marked as
        superseded, and {review.case.referringClinician.name} is told by e-mail.
      </p>
      <TextArea label="Why the report is corrected" rows={2} error={errors.reason?.message} registration={form.register('reason')} />
      <TextArea label="What changed" rows={2} error={errors.changesSummary?.message} registration={form.register('changesSummary')} />
      {newResults ? (
        <div className="flex flex-wrap items-center gap-2 text-sm text-ink-soft">
          <span>The interpretation below is the signed one; check it against the new results.</span>
          <Button variant="quiet" onClick={() => form.setValue('interpretation', review.proposal.interpretation, { shouldDirty: true })}>
            Start from Cristae’s proposal for the new results
          </Button>
        </div>
      ) : null}
      <TextArea
        label="Interpretation of the corrected version"
        rows={10}
        maxLength={INTERPRETATION_MAX}
        error={errors.interpretation?.message}
        registration={form.register('interpretation')}
      />
      <div className="grid gap-3 md:grid-cols-2">
        <TextField label="Meaning of the signature" list="correction-meanings" error={errors.meaning?.message} registration={form.register('meaning')} />
        <datalist id="correction-meanings">
          {signatureMeanings.map((m) => (
            <option key={m} value={m} />
          ))}
        </datalist>
        <TextField
          label="Your password, to sign the correction"
          type="password"
          autoComplete="current-password"
          error={errors.password?.message}
          registration={form.register('password')}
        />
      </div>
      {formError ? <Notice tone="error">{formError}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" disabled={correct.isPending}>
          {correct.isPending ? 'Signing…' : `Sign and release version ${current.version + 1}`}
        </Button>
        <Button variant="quiet" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
