import type { UploadSummary } from '@/schemas/measurement';
import { formatBytes, formatWhen } from '@/utils/format';


/** Files kept with the case, byte for byte, each with its SHA-256 and a download link. */
export function UploadsList({ uploads }: { uploads: UploadSummary[] }) {
  if (uploads.length === 0) return <p className="text-sm text-ink-faint">No file uploaded for this case.</p>;
  return (
    <ul className="flex flex-col divide-y divide-paper-line text-sm">
      {uploads.map((u) => (
        <li key={u.id} className="flex flex-wrap items-baseline justify-between gap-2 py-2">
          <span>
            <a className="font-medium text-matrix-700 underline" href={`/api/uploads/${u.id}/download`} download={u.filename}>
              {u.filename}
            </a>{' '}
            <span className="text-ink-faint">
              · {formatBytes(u.sizeBytes)} · {u.measurementCount} measurements · {u.uploadedBy ?? 'unknown'} · {formatWhen(u.createdAt)}
            </span>
          </span>
          <span className="font-mono text-xs text-ink-faint" title={u.sha256}>
            SHA-256 {u.sha256.slice(0, 16)}…
          </span>
        </li>
      ))}
    </ul>
  );
}
