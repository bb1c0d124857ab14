import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { AwaitingSecondDirector, mayApprove, type ApprovalViewer } from '@/components/ui/second-director';
import type { StoredAssayDefinition } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { definitionQueries, useApproveDefinitionVersion, useWithdrawDefinitionVersion } from '../api/definition-queries';
import { DefinitionEditor } from './definition-editor';
import { formatWhen } from '@/utils/format';

function History({ code }: { code: AssayCode }) {
  const { data, isPending } = useQuery(definitionQueries.versions(code));
  if (isPending) return <Loading what="Loading versions" />;
  return (
    <ol className="mt-2 flex flex-col gap-1 text-xs text-ink-soft">
      {data?.map((v) => (
        <li key={v.id}>
          <span className="font-semibold text-ink">v{v.definition.version}</span> · {statusWords[v.status]} · ε {v.definition.epsilonPerMmPerCm} ·{' '}
          {v.definition.rateModel} · {formatWhen(v.createdAt)} · {v.createdBy ?? 'published defaults'}
          {v.approvedBy ? ` · approved by ${v.approvedBy}${v.selfApproved ? ' (its own author)' : ''}` : ''}
          {v.changeNote ? ` — ${v.changeNote}` : ''}
        </li>
      ))}
    </ol>
  );
}

const statusWords: Record<StoredAssayDefinition['status'], string> = {
  draft: 'draft, awaiting a second director',
  approved: 'approved',
  withdrawn: 'withdrawn draft',
};

/** Plain names of the fields a draft most often changes; any other is named by its key. */
const changeLabels: Partial<Record<keyof StoredAssayDefinition['definition'], string>> = {
  name: 'name',
  wavelengthNm: 'wavelength (nm)',
  chromophore: 'chromophore',
  epsilonPerMmPerCm: 'ε (mM⁻¹·cm⁻¹)',
  epsilonSource: 'source of ε',
  direction: 'absorbance direction',
  background: 'background',
  backgroundNote: 'background note',
  rateModel: 'rate model',
  r2Threshold: 'r² flag limit',
  minPoints: 'fewest readings',
  linearRangeMin: 'linear range, lowest A',
  linearRangeMax: 'linear range, highest A',
  cvLimitPct: 'replicate CV limit (%)',
};

/** A draft of the next version: what changed, who drafted it, and approve or withdraw. */
function PendingDraft({ draft, current, viewer }: { draft: StoredAssayDefinition; current: StoredAssayDefinition; viewer: ApprovalViewer }) {
  const code = draft.definition.code;
  const approve = useApproveDefinitionVersion(code);
  const withdraw = useWithdrawDefinitionVersion(code);
  const [reason, setReason] = useState<string | null>(null);
  const changed = (Object.keys(draft.definition) as (keyof typeof draft.definition)[]).filter(
    (k) => k !== 'version' && JSON.stringify(draft.definition[k]) !== JSON.stringify(current.definition[k]),
  );
  const error = approve.error ?? withdraw.error;
  return (
    <div role="group" aria-label={`Draft version ${draft.definition.version}`} className="mb-4 flex flex-col gap-2 rounded-md border border-copper-300 bg-copper-50 p-3 text-sm">
      <p className="font-semibold text-copper-700">Draft of version {draft.definition.version}</p>
      <AwaitingSecondDirector viewer={viewer} drafterId={draft.createdById} drafterName={draft.createdBy} draftedAt={draft.createdAt} />
      <p className="text-ink">
        Changes: {changed.length > 0 ? changed.map((k) => `${changeLabels[k] ?? k} ${String(current.definition[k])} → ${String(draft.definition[k])}`).join('; ') : 'none'}
        {draft.changeNote ? `. Why: ${draft.changeNote}` : ''}
      </p>
      {error ? <Notice tone="error">{error.message}</Notice> : null}
      {reason === null ? (
        <div className="flex gap-2">
          {mayApprove(viewer, draft.createdById) ? (
            <Button disabled={approve.isPending} onClick={() => approve.mutate(draft.definition.version)}>
              {approve.isPending ? 'Approving…' : `Approve version ${draft.definition.version}`}
            </Button>
          ) : null}
          <Button variant="secondary" onClick={() => setReason('')}>
            Withdraw draft…
          </Button>
        </div>
      ) : (
        <form
          className="flex flex-col gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            withdraw.mutate({ version: draft.definition.version, input: { reason } }, { onSuccess: () => setReason(null) });
          }}
        >
          <TextField label="Why is it withdrawn?" value={reason} onChange={(e) => setReason(e.target.value)} />
          <div className="flex gap-2">
            <Button type="submit" variant="danger" disabled={withdraw.isPending}>Withdraw draft</Button>
            <Button variant="quiet" onClick={() => setReason(null)}>Cancel</Button>
          </div>
        </form>
      )}
    </div>
  );
}

function DefinitionCard({ stored, draft, viewer }: { stored: StoredAssayDefinition; draft: StoredAssayDefinition | null; viewer: ApprovalViewer | null }) {
  const d = stored.definition;
  const [editing, setEditing] = useState(false);
  const [showHistory, setShowHistory] = useState(false);
  return (
    <Card
      title={`${d.code} · ${d.name}`}
      actions={
        !editing ? (
          <div className="flex gap-2">
            <Button variant="quiet" onClick={() => setShowHistory((s) => !s)}>
              {showHistory ? 'Hide versions' : 'Versions'}
            </Button>
            {viewer && !draft ? (
              <Button variant="secondary" onClick={() => setEditing(true)}>
                New version
              </Button>
            ) : null}
          </div>
        ) : null
      }
    >
      {editing ? (
        <DefinitionEditor definition={d} onDone={() => setEditing(false)} />
      ) : (
        <>
          {draft && viewer ? <PendingDraft draft={draft} current={stored} viewer={viewer} /> : null}
          {draft && !viewer ? <Notice>Version {draft.definition.version} is drafted and awaits a second director; this one stays in use until then.</Notice> : null}
          <dl className="num grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
            <div><dt className="text-ink-faint">Version</dt><dd>v{d.version}</dd></div>
            <div><dt className="text-ink-faint">Read at</dt><dd>{d.wavelengthNm} nm ({d.chromophore})</dd></div>
            <div><dt className="text-ink-faint">ε</dt><dd>{d.epsilonPerMmPerCm} mM⁻¹·cm⁻¹</dd></div>
            <div><dt className="text-ink-faint">Absorbance</dt><dd>{d.direction}</dd></div>
            <div><dt className="text-ink-faint">Background</dt><dd>{d.background}{d.backgroundNote ? ` (${d.backgroundNote})` : ''}</dd></div>
            <div><dt className="text-ink-faint">Rate model</dt><dd>{d.rateModel}</dd></div>
            <div><dt className="text-ink-faint">Window rule</dt><dd>straight within {d.curvatureLimitPct}%, ≥ {d.minPoints} readings, start by {d.lagMaxS} s</dd></div>
            <div><dt className="text-ink-faint">Flag when</dt><dd>r² &lt; {d.r2Threshold}; a reading &gt; {d.outlierLimitSd}× scatter off</dd></div>
            <div><dt className="text-ink-faint">Share limits</dt><dd>background {d.maxBackgroundPct}%, blank {d.maxBlankPct}%</dd></div>
            <div><dt className="text-ink-faint">Plausible up to</dt><dd>{d.plausibleActivityMax} nmol/min/mg</dd></div>
            <div><dt className="text-ink-faint">Linear range</dt><dd>{d.linearRangeMin}–{d.linearRangeMax} A</dd></div>
          </dl>
          <p className="mt-2 text-xs text-ink-faint">ε source: {d.epsilonSource}</p>
          {showHistory ? <History code={d.code} /> : null}
        </>
      )}
    </Card>
  );
}

/** Every assay's definition in force; `viewer` (a director) drafts, approves and withdraws versions. */
export function DefinitionsList({ viewer }: { viewer: ApprovalViewer | null }) {
  const { data, isPending, error } = useQuery(definitionQueries.withDrafts());
  if (isPending) return <Loading />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <div className="flex flex-col gap-4">
      {data.items.map((s) => (
        // Keyed by the assay, not by the row in force: approving a new version changes that row, and a card that
        // remounted lost its open versions list (the user saw it close the moment the approval landed).
        <DefinitionCard
          key={s.definition.code}
          stored={s}
          draft={data.drafts.find((x) => x.definition.code === s.definition.code) ?? null}
          viewer={viewer}
        />
      ))}
    </div>
  );
}
