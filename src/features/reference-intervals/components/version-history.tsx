import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { Loading, Notice } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { intervalQueries } from '../api/interval-queries';
import { methodNames, num, periodText } from './interval-text';
import { StatusTag } from './status-tag';
import { formatWhen } from '@/utils/format';
import { TableBox } from '@/components/ui/table-box';

/** Every version of one key, newest first; the one on screen is marked. */
export function VersionHistory({ id }: { id: number }) {
  const { data, isPending, error } = useQuery(intervalQueries.history(id));
  if (isPending) return <Loading what="Loading versions" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <TableBox label="Versions">
      <table className="w-full text-left text-sm">
        <thead className="border-b border-paper-line text-xs uppercase tracking-wide text-ink-faint">
          <tr>
            <th className="py-2 pr-3 font-medium">Version</th>
            <th className="py-2 pr-3 font-medium">Status</th>
            <th className="py-2 pr-3 font-medium">Limits</th>
            <th className="py-2 pr-3 font-medium">n</th>
            <th className="py-2 pr-3 font-medium">Method</th>
            <th className="py-2 pr-3 font-medium">Effective</th>
            <th className="py-2 pr-3 font-medium">Set</th>
            <th className="py-2 font-medium">Approved by</th>
          </tr>
        </thead>
        <tbody>
          {data.map((v) => (
            <tr key={v.id} className={`border-b border-paper-line/60 ${v.id === id ? 'bg-matrix-50/70' : ''}`}>
              <td className="num py-1.5 pr-3">
                {v.id === id ? (
                  <span className="font-semibold" aria-current="true">
                    v{v.version} (shown)
                  </span>
                ) : (
                  <Link className="text-matrix-700 underline" to={paths.intervalDetail.href(v.id)}>
                    v{v.version}
                  </Link>
                )}
              </td>
              <td className="py-1.5 pr-3">
                <StatusTag interval={v} />
              </td>
              <td className="num py-1.5 pr-3 whitespace-nowrap">
                {num(v.lower)} – {num(v.upper)}
              </td>
              <td className="num py-1.5 pr-3">{v.n}</td>
              <td className="py-1.5 pr-3">{methodNames[v.method]}</td>
              <td className="num py-1.5 pr-3 whitespace-nowrap">{periodText(v)}</td>
              <td className="py-1.5 pr-3 text-ink-soft">{v.setName}</td>
              <td className="py-1.5 text-ink-soft">
                {v.approvedByName ? `${v.approvedByName}, ${formatWhen(v.approvedAt!)}` : '—'}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}
