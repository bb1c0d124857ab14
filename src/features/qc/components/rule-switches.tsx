import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { westgardRuleMeaning, westgardRules, type WestgardRuleName } from '@/schemas/qc';
import { qcQueries } from '../api/qc-queries';
import { useSaveQcRules } from '../api/use-save-qc-rules';

/** The Westgard rules the laboratory applies to every run; directors switch them, everyone else reads them. */
export function RuleSwitches({ canEdit }: { canEdit: boolean }) {
  const { data, isPending, error } = useQuery(qcQueries.rules());
  const save = useSaveQcRules();
  const [chosen, setChosen] = useState<Set<WestgardRuleName> | null>(null);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  if (isPending) return <Loading what="Loading the rules" />;
  if (error) return <Notice tone="error">The rules could not be loaded.</Notice>;
  const current = chosen ?? new Set(data.rules);
  const changed = chosen !== null && [...westgardRules].some((r) => chosen.has(r) !== data.rules.includes(r));
  const toggle = (rule: WestgardRuleName) => {
    const next = new Set(current);
    if (next.has(rule)) next.delete(rule);
    else next.add(rule);
    setChosen(next);
    setMessage(null);
  };
  return (
    <Card title="Rules applied to every run">
      <p className="mb-3 text-sm text-ink-soft">
        A run is held back when a switched-on rule other than 1-2s fires; 1-2s alone only warns. After Westgard, Barry, Hunt and
        Groth, Clin Chem 1981;27:493–501. z is (result − target mean) / target SD.
      </p>
      <fieldset disabled={!canEdit || save.isPending}>
        <legend className="sr-only">Westgard rules</legend>
        <ul className="grid gap-1.5 sm:grid-cols-2">
          {westgardRules.map((rule) => (
            <li key={rule}>
              <div className="flex items-start gap-2 text-sm">
                <input id={`qc-rule-${rule}`} type="checkbox" className="mt-1" checked={current.has(rule)} onChange={() => toggle(rule)} />
                <label htmlFor={`qc-rule-${rule}`}>
                  <span className="font-mono font-semibold">{rule}</span> <span className="text-ink-soft">{westgardRuleMeaning[rule]}</span>
                </label>
              </div>
            </li>
          ))}
        </ul>
      </fieldset>
      {canEdit ? (
        <div className="mt-3 flex items-center gap-3">
          <Button
            disabled={!changed || save.isPending}
            onClick={() =>
              save.mutate(
                { rules: westgardRules.filter((r) => current.has(r)) },
                {
                  onSuccess: () => {
                    setChosen(null);
                    setMessage({ tone: 'success', text: 'Saved. The next run evaluated uses these rules.' });
                  },
                  onError: (err) =>
                    setMessage({ tone: 'error', text: err instanceof ApiError ? (Object.values(err.fields)[0] ?? err.message) : 'Not saved.' }),
                },
              )
            }
          >
            {save.isPending ? 'Saving…' : 'Save the rules'}
          </Button>
          {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
        </div>
      ) : (
        <p className="mt-2 text-xs text-ink-faint">A director chooses the rules.</p>
      )}
    </Card>
  );
}
