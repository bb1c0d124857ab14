import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Card, Notice } from '@/components/ui/layout';
import { TableBox } from '@/components/ui/table-box';
import { paths } from '@/config/paths';
import { ApiError } from '@/lib/api-client';
import type { PlateFormat } from '@/schemas/plate';
import { runOverrideInputSchema, type RunDetail } from '@/schemas/run';
import { fmt, formatBytes, formatWhen } from '@/utils/format';
import { useOverrideRun } from '../api/override-run';
import { ownerKeys } from '../utils/run-layout';
import { ControlTable } from './control-table';
import { PlateLegend, PlatePicture } from './plate-picture';
import { QcStatusBadge, ViolationList } from './qc-status';

/** A director's release of a run whose controls did not pass: the reason and the password typed again. */
function OverrideForm({ run }: { run: RunDetail }) {
  const [reason, setReason] = useState('');
  const [password, setPassword] = useState('');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const override = useOverrideRun(run.id);
  return (
    <form
      aria-label="Release this run despite its controls"
      className="flex flex-col gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        const parsed = runOverrideInputSchema.safeParse({ reason, password });
        if (!parsed.success) {
          const f: Record<string, string> = {};
          for (const i of parsed.error.issues) f[String(i.path[0])] ??= i.message;
          return setFields(f);
        }
        setFields({});
        setError(null);
        override.mutate(parsed.data, {
          onSuccess: () => setPassword(''),
          onError: (err) => {
            setPassword('');
            if (err instanceof ApiError) {
              setFields(err.fields);
              setError(err.message);
            } else setError('The server could not be reached; the run was not released.');
          },
        });
      }}
    >
      <Notice tone="info">
        Releasing lets this run’s results go forward although its quality control {run.qcStatus === 'reject' ? 'was rejected' : 'could not be evaluated'}. Your reason is printed in the
        methods section of every report that uses these results, and the release is kept in the audit trail with your name and the time.
      </Notice>
      <TextArea label="Why the results can be released (corrective action, investigation)" value={reason} onChange={(e) => setReason(e.target.value)} error={fields.reason} />
      <div className="max-w-xs">
        <TextField label="Your password, typed again" type="password" autoComplete="current-password" value={password} onChange={(e) => setPassword(e.target.value)} error={fields.password} />
      </div>
      {error ? <Notice tone="error">{error}</Notice> : null}
      <div>
        <Button type="submit" variant="danger" disabled={override.isPending}>
          {override.isPending ? 'Releasing…' : 'Release the run with this reason'}
        </Button>
      </div>
    </form>
  );
}

/**
 * One analytical run: its plate with every well's use, the controls' z-scores and the rules that fired, the
 * measurements it produced (linked to their cases), the kept file, and — for a director, when the controls did
 * not pass — the documented release.
 */
export function RunDetailView({ run, canOverride }: { run: RunDetail; canOverride: boolean }) {
  const materials = new Map(run.controls.map((c) => [c.controlMaterialId, c]));
  const names = ownerKeys(run.wells, (owner) => {
    const [kind, id] = owner.split(':') as [string, string];
    if (kind === 'control') {
      const c = materials.get(Number(id));
      return c ? `${c.material} · lot ${c.lot} · ${c.level}` : `control material ${id}`;
    }
    const m = run.measurements.find((x) => x.specimenId === Number(id));
    return m ? `${m.accession} specimen ${m.specimenLabel}` : `specimen ${id}`;
  });
  const materialName = (id: number) => {
    const c = materials.get(id);
    return c ? `${c.material} ${c.level} (lot ${c.lot})` : `control material ${id}`;
  };
  const needsRelease = run.override === null && (run.qcStatus === 'reject' || run.qcStatus === 'none');

  return (
    <div className="flex flex-col gap-5">
      <Card title="Quality control">
        <div className="flex flex-col gap-3" data-testid="run-qc">
          <QcStatusBadge status={run.qcStatus} overridden={run.override !== null} />
          <ViolationList violations={run.violations} materialName={materialName} />
          <ControlTable controls={run.controls} caption="Control values, targets and z-scores" />
          {run.override ? (
            <div className="rounded-md border border-ink-soft px-3 py-2 text-sm" data-testid="run-override">
              <p className="font-medium text-ink">
                Released by {run.override.by ?? 'a director'} on {formatWhen(run.override.at)}
              </p>
              <p className="text-ink-soft">Reason: {run.override.reason}</p>
              <p className="text-xs text-ink-faint">Printed in the methods section of the reports that use these results; kept in the audit trail.</p>
            </div>
          ) : null}
          {needsRelease && !canOverride ? (
            <p className="text-sm text-ink-soft">
              {run.qcStatus === 'reject' ? 'The controls failed: ' : 'No control was evaluated: '}these results cannot be submitted for review until a director releases the run with a documented reason.
            </p>
          ) : null}
        </div>
      </Card>
      {needsRelease && canOverride ? (
        <Card title="Release the run">
          <OverrideForm run={run} />
        </Card>
      ) : null}
      <Card title="Plate">
        <div className="flex flex-col gap-2">
          <PlatePicture format={run.plateFormat as PlateFormat} wells={run.wells} names={names} label={`Plate of run ${run.runNumber}`} />
          <PlateLegend names={names} />
        </div>
      </Card>
      <Card title="Measurements this run produced">
        {run.measurements.length === 0 ? (
          <p className="text-sm text-ink-soft">None.</p>
        ) : (
          <TableBox label="Measurements this run produced">
            <table className="w-full text-left text-sm">
              <thead className="border-b border-paper-line text-ink-soft">
                <tr>
                  <th className="py-1 pr-3 font-medium">Case</th>
                  <th className="py-1 pr-3 font-medium">Specimen</th>
                  <th className="py-1 pr-3 font-medium">Assay</th>
                  <th className="py-1 pr-3 font-medium">Replicate</th>
                  <th className="py-1 pr-3 font-medium">Activity</th>
                  <th className="py-1 pr-3 font-medium">Flags</th>
                </tr>
              </thead>
              <tbody className="num">
                {run.measurements.map((m) => (
                  <tr key={m.id} className={`border-b border-paper-line/70 ${m.excluded ? 'text-ink-faint line-through' : ''}`}>
                    <td className="py-1 pr-3">
                      <Link to={paths.caseAssays.href(m.caseId)} className="font-mono text-matrix-700 hover:underline">
                        {m.accession}
                      </Link>
                    </td>
                    <td className="py-1 pr-3">{m.specimenLabel}</td>
                    <td className="py-1 pr-3">{m.assay}</td>
                    <td className="py-1 pr-3">{m.replicate}</td>
                    <td className="py-1 pr-3">{fmt(m.activity)}</td>
                    <td className="py-1 pr-3 text-xs">{m.flags.length ? m.flags.map((f) => f.message).join('; ') : '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </TableBox>
        )}
      </Card>
      <Card title="Plate file">
        {run.upload ? (
          <p className="text-sm">
            <a href={`/api/uploads/${run.upload.id}/download`} className="font-medium text-matrix-700 underline" download>
              {run.upload.filename}
            </a>{' '}
            <span className="text-ink-soft">
              · {formatBytes(run.upload.sizeBytes)} · SHA-256 <span className="font-mono text-xs break-all">{run.upload.sha256}</span>
            </span>
          </p>
        ) : (
          <p className="text-sm text-ink-soft">No file is kept with this run.</p>
        )}
        <p className="mt-2 text-xs text-ink-faint">
          Assay definitions used: {Object.entries(run.definitionVersions).map(([a, v]) => `${a} v${v}`).join(', ') || '—'}
          {run.pathlengthCm !== null ? ` · pathlength ${fmt(run.pathlengthCm)} cm` : ''}
        </p>
      </Card>
    </div>
  );
}
