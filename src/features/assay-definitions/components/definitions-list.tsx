import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card, Loading, Notice } from '@/components/ui/layout';
import type { StoredAssayDefinition } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { definitionQueries } from '../api/definition-queries';
import { DefinitionEditor } from './definition-editor';
import { formatWhen } from '@/utils/format';

function History({ code }: { code: AssayCode }) {
  const { data, isPending } = useQuery(definitionQueries.versions(code));
  if (isPending) return <Loading what="Loading versions" />;
  return (
    <ol className="mt-2 flex flex-col gap-1 text-xs text-ink-soft">
      {data?.map((v) => (
        <li key={v.id}>
          <span className="font-semibold text-ink">v{v.definition.version}</span> · ε {v.definition.epsilonPerMmPerCm} ·{' '}
          {v.definition.rateModel} · {formatWhen(v.createdAt)} · {v.createdBy ?? 'published defaults'}
          {v.changeNote ? ` — ${v.changeNote}` : ''}
        </li>
      ))}
    </ol>
  );
}

function DefinitionCard({ stored }: { stored: StoredAssayDefinition }) {
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
            <Button variant="secondary" onClick={() => setEditing(true)}>
              New version
            </Button>
          </div>
        ) : null
      }
    >
      {editing ? (
        <DefinitionEditor definition={d} onDone={() => setEditing(false)} />
      ) : (
        <>
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

export function DefinitionsList() {
  const { data, isPending, error } = useQuery(definitionQueries.current());
  if (isPending) return <Loading />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <div className="flex flex-col gap-4">
      {data.map((s) => (
        <DefinitionCard key={s.id} stored={s} />
      ))}
    </div>
  );
}
