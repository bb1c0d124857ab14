import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import {
  DEFAULT_SIGNATURE_MEANING,
  INTERPRETATION_MAX,
  signFormSchema,
  signatureMeanings,
  type ReviewCase,
  type SignResult,
} from '@/schemas/report';
import { useSaveDraft } from '../api/save-draft';
import { useSignCase } from '../api/sign-case';
import { formatWhen } from '@/utils/format';

/**
 * The interpretation the director will sign, Cristae's proposal beside it, and the signature itself
 * (password typed again, meaning stated). What is in the text box when "Sign" is pressed is what is signed.
 */
export function SignOutPanel({ review, onSigned }: { review: ReviewCase; onSigned: (r: SignResult) => void | Promise<void> }) {
  const caseId = review.case.id;
  const form = useZodForm(signFormSchema, {
    defaultValues: {
      interpretation: review.draft?.interpretation || review.proposal.interpretation,
      meaning: DEFAULT_SIGNATURE_MEANING,
      password: '',
    },
  });
  const [formError, setFormError] = useState<string | null>(null);
  const [draftNote, setDraftNote] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const saveDraft = useSaveDraft();
  const sign = useSignCase({ onDone: onSigned });
  const { errors, dirtyFields } = form.formState;
  useUnsavedChangesPrompt(Boolean(dirtyFields.interpretation) && !sign.isSuccess);
  const text = form.watch('interpretation');

  const onSubmit = form.handleSubmit((values) => {
    setFormError(null);
    sign.mutate(
      { caseId, input: { password: values.password, meaning: values.meaning, interpretation: values.interpretation, version: review.case.version } },
      {
        onError: (err) => {
          form.setValue('password', '');
          if (err instanceof ApiError && err.code === 'BAD_CREDENTIALS') form.setError('password', { type: 'server', message: err.message });
          else setFormError(applyServerError(form, err));
        },
      },
    );
  });

  const onSaveDraft = () => {
    setDraftNote(null);
    saveDraft.mutate(
      { caseId, input: { interpretation: form.getValues('interpretation'), version: review.draft?.version ?? null } },
      {
        onSuccess: (d) => {
          form.reset({ ...form.getValues(), interpretation: d.interpretation });
          setDraftNote({ tone: 'success', text: 'Draft saved. It is not signed and no one outside the laboratory can see it.' });
        },
        onError: (err) => setDraftNote({ tone: 'error', text: err instanceof ApiError ? err.message : 'The draft was not saved.' }),
      },
    );
  };

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign the report">
      <div className="grid gap-4 xl:grid-cols-[1.4fr_1fr]">
        <div className="flex flex-col gap-2">
          <TextArea
            label="Interpretation (this text is signed and printed on the report)"
            rows={14}
            maxLength={INTERPRETATION_MAX}
            error={errors.interpretation?.message}
            registration={form.register('interpretation')}
            hint={`${text.length} of ${INTERPRETATION_MAX} characters${review.draft ? ` · draft saved ${formatWhen(review.draft.updatedAt)}` : ''}`}
          />
          <div className="flex flex-wrap gap-2">
            <Button variant="secondary" onClick={onSaveDraft} disabled={saveDraft.isPending}>
              {saveDraft.isPending ? 'Saving…' : 'Save draft'}
            </Button>
            <Button
              variant="quiet"
              onClick={() => form.setValue('interpretation', review.proposal.interpretation, { shouldDirty: true })}
            >
              Start again from the proposed wording
            </Button>
          </div>
          {draftNote ? <Notice tone={draftNote.tone}>{draftNote.text}</Notice> : null}
        </div>
        <aside className="rounded-md border border-matrix-200 bg-matrix-50 px-4 py-3 text-sm" aria-label="Proposed wording">
          <h3 className="font-semibold text-matrix-900">Proposed wording</h3>
          <p className="mt-1 text-xs text-ink-soft">
            Built by Cristae from the pattern, the percentages of the reference means and the criterion bands. It restates the
            numbers; the interpretation is yours.
          </p>
          {review.proposal.patternSummary ? <p className="mt-2 font-medium text-ink">{review.proposal.patternSummary}</p> : null}
          <p className="mt-2 whitespace-pre-line text-ink">{review.proposal.interpretation}</p>
        </aside>
      </div>

      <fieldset className="rounded-md border border-paper-line bg-paper px-4 py-3">
        <legend className="px-1 text-sm font-semibold text-matrix-900">Electronic signature</legend>
        <p className="mb-3 text-sm text-ink-soft">
          Signing renders the report once and stores it with its SHA-256; it can never be edited, only replaced by a corrected
          version. {review.case.referringClinician.name} is e-mailed that it is ready.
        </p>
        <div className="grid gap-3 md:grid-cols-2">
          <TextField
            label="Meaning of the signature"
            list="signature-meanings"
            error={errors.meaning?.message}
            registration={form.register('meaning')}
          />
          <datalist id="signature-meanings">
            {signatureMeanings.map((m) => (
              <option key={m} value={m} />
            ))}
          </datalist>
          <TextField
            label="Your password, to sign"
            type="password"
            autoComplete="current-password"
            error={errors.password?.message}
            registration={form.register('password')}
          />
        </div>
        {formError ? (
          <div className="mt-3">
            <Notice tone="error">{formError}</Notice>
          </div>
        ) : null}
        <div className="mt-3">
          <Button type="submit" disabled={sign.isPending}>
            {sign.isPending ? 'Signing…' : 'Sign and release the report'}
          </Button>
        </div>
      </fieldset>
    </form>
  );
}
