import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Card, Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { readPastedNumbers } from '@/schemas/pasted-numbers';
import { minVerificationValues, type VerificationRequestBody, type VerificationRound } from '@/schemas/reference-interval';
import { useVerifyInterval } from '../api/verify-interval';
import { TableBox } from '@/components/ui/table-box';

const decisionText = {
  verified: { title: 'Accept: the interval transfers', tone: 'success' },
  test_more: { title: 'Not yet: test 20 more local samples', tone: 'info' },
  not_verified: { title: 'Reject: the interval does not transfer', tone: 'error' },
} as const;

function Round({ name, r }: { name: string; r: VerificationRound }) {
  return (
    <tr className="border-b border-paper-line/60">
      <th scope="row" className="py-1.5 pr-3 text-left font-medium">{name}</th>
      <td className="num py-1.5 pr-3">{r.n}</td>
      <td className="num py-1.5 pr-3">{r.below}</td>
      <td className="num py-1.5 pr-3">{r.above}</td>
      <td className="num py-1.5 pr-3">{r.outside}</td>
      <td className="num py-1.5 pr-3">{r.allowedOutside}</td>
      <td className="py-1.5">{r.passed ? 'Passed' : 'Failed'}</td>
    </tr>
  );
}

/** Checks an interval taken from elsewhere against local reference samples (CLSI EP28-A3c). */
export function VerifyForm() {
  const verify = useVerifyInterval();
  const [lower, setLower] = useState('');
  const [upper, setUpper] = useState('');
  const [first, setFirst] = useState('');
  const [second, setSecond] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const submit = () => {
    const found: Record<string, string> = {};
    const lo = Number(lower);
    const hi = Number(upper);
    if (lower.trim() === '' || !Number.isFinite(lo)) found.lower = 'Enter the lower limit';
    if (upper.trim() === '' || !Number.isFinite(hi)) found.upper = 'Enter the upper limit';
    else if (Number.isFinite(lo) && !(hi > lo)) found.upper = 'The upper limit must be greater than the lower limit';
    const a = readPastedNumbers(first);
    if (a.problem) found.values = a.problem;
    else if (a.values.length < minVerificationValues) {
      found.values = `Paste at least ${minVerificationValues} local values; ${a.values.length} found`;
    }
    const b = second.trim() === '' ? null : readPastedNumbers(second);
    if (b?.problem) found.additionalValues = b.problem;
    else if (b && b.values.length < minVerificationValues) {
      found.additionalValues = `Paste at least ${minVerificationValues} values; ${b.values.length} found`;
    }
    setErrors(found);
    if (Object.keys(found).length > 0) return;
    // The text goes as pasted: the server reads it by the same shared convention and names any bad line.
    const input: VerificationRequestBody = { lower: lo, upper: hi, values: first, ...(b ? { additionalValues: second } : {}) };
    verify.mutate(input, {
      onError: (err) => {
        if (err instanceof ApiError) setErrors(err.fields);
      },
    });
  };

  const result = verify.data;
  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <Card title="Interval and local samples">
        <form
          noValidate
          className="flex flex-col gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            submit();
          }}
        >
          <div className="grid grid-cols-2 gap-3">
            <TextField label="Adopted lower limit" inputMode="decimal" value={lower} onChange={(e) => setLower(e.target.value)} error={errors.lower} />
            <TextField label="Adopted upper limit" inputMode="decimal" value={upper} onChange={(e) => setUpper(e.target.value)} error={errors.upper} />
          </div>
          <TextArea
            label="Local reference values"
            hint="At least 20, from healthy local subjects, measured here. Paste a column or separate with spaces; use a point for decimals (37.5, not 37,5)."
            value={first}
            onChange={(e) => setFirst(e.target.value)}
            error={errors.values}
          />
          <TextArea
            label="Second set (only if the first set failed)"
            hint="20 new values; judged on their own by the same rule."
            value={second}
            onChange={(e) => setSecond(e.target.value)}
            error={errors.additionalValues}
          />
          <div>
            <Button type="submit" disabled={verify.isPending}>
              {verify.isPending ? 'Checking…' : 'Check the interval'}
            </Button>
          </div>
        </form>
      </Card>
      <Card title="Verdict">
        {result ? (
          <div className="flex flex-col gap-3">
            <Notice tone={decisionText[result.decision].tone}>
              <strong className="font-semibold">{decisionText[result.decision].title}.</strong> {result.message}
            </Notice>
            <TableBox label="Verification values">
              <table className="w-full text-sm">
                <thead className="border-b border-paper-line text-xs uppercase tracking-wide text-ink-faint">
                  <tr>
                    <th className="py-1.5 pr-3 text-left font-medium">Set</th>
                    <th className="py-1.5 pr-3 text-left font-medium">n</th>
                    <th className="py-1.5 pr-3 text-left font-medium">Below</th>
                    <th className="py-1.5 pr-3 text-left font-medium">Above</th>
                    <th className="py-1.5 pr-3 text-left font-medium">Outside</th>
                    <th className="py-1.5 pr-3 text-left font-medium">Allowed</th>
                    <th className="py-1.5 text-left font-medium">Result</th>
                  </tr>
                </thead>
                <tbody>
                  <Round name="First set" r={result.firstRound} />
                  {result.secondRound ? <Round name="Second set" r={result.secondRound} /> : null}
                </tbody>
              </table>
            </TableBox>
            <p className="text-xs text-ink-faint">
              Rule: CLSI EP28-A3c transference check with 20 local samples; the interval is accepted when no more than
              2 of 20 (10%) fall outside it, otherwise 20 more are tested. Values equal to a limit count as inside.
            </p>
          </div>
        ) : (
          <p className="text-sm text-ink-soft">
            Enter the limits you want to adopt and the local values. Cristae counts how many fall outside and says whether
            the interval can be accepted. Nothing is stored.
          </p>
        )}
      </Card>
    </div>
  );
}
