import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { assayCodes, specimenTypeLabels, specimenTypes } from '@/schemas/common';
import type { StoredInterval } from '@/schemas/reference-interval-api';
import { intervalQueries } from '../api/interval-queries';
import { ageText, assayNames, measureNames, methodNames, num, periodText } from './interval-text';
import { StatusTag } from './status-tag';
import { TableBox } from '@/components/ui/table-box';

const measureOrder = { activity: 0, ratio_cs: 1, ratio_cii: 2 } as const;

function IntervalRows({ items }: { items: StoredInterval[] }) {
  return (
    <>
      {items.map((i) => (
        <tr key={i.id} className="border-b border-paper-line/60 align-top">
          <td className="py-1.5 pr-3 whitespace-nowrap">
            {measureNames[i.measure]}
            {i.measure === 'activity' ? <span className="block text-xs text-ink-faint">{i.unit}</span> : null}
          </td>
          <td className="py-1.5 pr-3 whitespace-nowrap">{ageText(i.ageBand)}</td>
          <td className="num py-1.5 pr-3 whitespace-nowrap">
            {num(i.lower)} – {num(i.upper)}
          </td>
          <td className="num py-1.5 pr-3 whitespace-nowrap">
            {num(i.mean)}
            {i.sd !== null ? <span className="text-ink-faint"> ± {num(i.sd)}</span> : null}
          </td>
          <td className="num py-1.5 pr-3">{i.n}</td>
          <td className="py-1.5 pr-3 whitespace-nowrap">{methodNames[i.method]}</td>
          <td className="num py-1.5 pr-3">
            <Link
              className="font-medium text-matrix-700 underline hover:text-matrix-900"
              to={paths.intervalDetail.href(i.id)}
            >
              v{i.version}
              <span className="sr-only">{` of ${i.assay} ${measureNames[i.measure].toLowerCase()}, ${ageText(i.ageBand)}: details and history`}</span>
            </Link>
          </td>
          <td className="py-1.5 pr-3">
            <StatusTag interval={i} />
          </td>
          <td className="num py-1.5 pr-3 whitespace-nowrap text-ink-soft">{periodText(i)}</td>
          <td className="py-1.5 whitespace-nowrap text-ink-soft">{i.approvedByName ?? '—'}</td>
        </tr>
      ))}
    </>
  );
}

function SpecimenTable({ items }: { items: StoredInterval[] }) {
  const byAssay = assayCodes
    .map((assay) => ({
      assay,
      rows: items
        .filter((i) => i.assay === assay)
        .sort((a, b) => measureOrder[a.measure] - measureOrder[b.measure] || a.ageBand.minYears - b.ageBand.minYears || b.version - a.version),
    }))
    .filter((g) => g.rows.length > 0);
  return (
    <TableBox label="Reference intervals">
      <table className="w-full text-left text-sm">
        <thead className="border-b border-paper-line text-xs uppercase tracking-wide text-ink-faint">
          <tr>
            <th className="py-2 pr-3 font-medium">Measure</th>
            <th className="py-2 pr-3 font-medium whitespace-nowrap">Age band</th>
            <th className="py-2 pr-3 font-medium">Limits</th>
            <th className="py-2 pr-3 font-medium">Mean ± SD</th>
            <th className="py-2 pr-3 font-medium">n</th>
            <th className="py-2 pr-3 font-medium">Method</th>
            <th className="py-2 pr-3 font-medium">Version</th>
            <th className="py-2 pr-3 font-medium">Status</th>
            <th className="py-2 pr-3 font-medium">Effective</th>
            <th className="py-2 font-medium whitespace-nowrap">Approved by</th>
          </tr>
        </thead>
        {byAssay.map((g) => (
          <tbody key={g.assay}>
            <tr>
              <th colSpan={10} scope="rowgroup" className="bg-paper-sunk/60 px-2 py-1.5 text-left text-xs font-semibold text-matrix-800">
                {g.assay} <span className="font-normal text-ink-soft">· {assayNames[g.assay]}</span>
              </th>
            </tr>
            <IntervalRows items={g.rows} />
          </tbody>
        ))}
      </table>
    </TableBox>
  );
}

/** Current intervals grouped by specimen type and assay; directors also see drafts awaiting approval. */
export function IntervalsOverview() {
  const { data, isPending, error } = useQuery(intervalQueries.list());
  if (isPending) return <Loading what="Loading reference intervals" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  const drafts = data.filter((i) => i.status === 'draft');
  const inForce = data.filter((i) => i.status !== 'draft');
  const groups = specimenTypes
    .map((type) => ({ type, items: inForce.filter((i) => i.specimenType === type) }))
    .filter((g) => g.items.length > 0);
  return (
    <div className="flex flex-col gap-6">
      {drafts.length > 0 ? (
        <Card title={`Drafts awaiting approval (${drafts.length})`}>
          <p className="mb-3 text-sm text-ink-soft">
            Drafts are not used for any result until a director approves them.
          </p>
          <ul className="flex flex-col divide-y divide-paper-line/70 text-sm">
            {drafts.map((d) => (
              <li key={d.id} className="flex flex-wrap items-baseline justify-between gap-3 py-2">
                <span>
                  <span className="font-medium">{d.assay} {measureNames[d.measure].toLowerCase()}</span> ·{' '}
                  {specimenTypeLabels[d.specimenType]} · {ageText(d.ageBand)} · v{d.version}
                  <span className="num text-ink-soft"> · {num(d.lower)} – {num(d.upper)} · {methodNames[d.method]} · {periodText(d)}</span>
                </span>
                <Link className="text-matrix-700 underline" to={paths.intervalDetail.href(d.id)}>
                  Review draft v{d.version}
                </Link>
              </li>
            ))}
          </ul>
        </Card>
      ) : null}
      {groups.length === 0 ? <Notice>No reference intervals are approved yet.</Notice> : null}
      {groups.map((g) => (
        <Card key={g.type} title={specimenTypeLabels[g.type]}>
          <p className="mb-3 text-sm text-ink-soft">
            {[...new Set(g.items.map((i) => i.setName))].length === 1 ? 'Interval set: ' : 'Interval sets: '}
            {[...new Set(g.items.map((i) => i.setName))].map((name, k) => (
              <span key={name}>
                {k > 0 ? '; ' : ''}
                <span className="font-medium text-ink">{name}</span>
              </span>
            ))}
            . Select a version number for its source, derivation and history.
          </p>
          <SpecimenTable items={g.items} />
        </Card>
      ))}
    </div>
  );
}
