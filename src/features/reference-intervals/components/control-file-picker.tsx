import { useQuery } from '@tanstack/react-query';
import { useId, useRef } from 'react';
import { Button } from '@/components/ui/button';
import { Loading, Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { controlFileHref, intervalQueries } from '../api/interval-queries';
import { useUploadControls } from '../api/upload-controls';
import { formatBytes, formatWhen } from '@/utils/format';
import { TableBox } from '@/components/ui/table-box';

function FileProblems({ error }: { error: unknown }) {
  if (!(error instanceof ApiError)) return <Notice tone="error">The file could not be uploaded.</Notice>;
  return (
    <div className="flex flex-col gap-2">
      <Notice tone="error">
        <strong className="font-semibold">The file was not stored. </strong>
        {error.message}
      </Notice>
      {error.issues.length > 0 ? (
        <TableBox label="Problems in the file">
          <table className="w-full text-left text-xs">
            <caption className="sr-only">Problems in the file</caption>
            <thead className="text-ink-faint">
              <tr>
                <th className="py-1 pr-3 font-medium">Row</th>
                <th className="py-1 pr-3 font-medium">Column</th>
                <th className="py-1 font-medium">Problem</th>
              </tr>
            </thead>
            <tbody>
              {error.issues.map((i, n) => (
                <tr key={n} className="border-t border-paper-line/60">
                  <td className="num py-1 pr-3">{i.row ?? '—'}</td>
                  <td className="py-1 pr-3 font-mono">{i.column ?? '—'}</td>
                  <td className="py-1">{i.message}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </TableBox>
      ) : null}
    </div>
  );
}

/** Lists the stored control files and takes a new one; the chosen id is lifted to the workbench. */
export function ControlFilePicker({ selected, onSelect }: { selected: number | null; onSelect: (id: number) => void }) {
  const files = useQuery(intervalQueries.controlFiles());
  const upload = useUploadControls();
  const inputRef = useRef<HTMLInputElement>(null);
  const inputId = useId();

  return (
    <div className="grid gap-5 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <fieldset>
        <legend className="mb-2 text-sm font-medium text-ink-soft">Stored control files</legend>
        {files.isPending ? <Loading what="Loading control files" /> : null}
        {files.data?.length === 0 ? <p className="text-sm text-ink-faint">None yet: upload one.</p> : null}
        <ul className="flex flex-col gap-1.5">
          {files.data?.map((f) => (
            <li key={f.id}>
              <div className={`flex items-start gap-3 rounded-md border px-3 py-2 text-sm ${selected === f.id ? 'border-matrix-400 bg-matrix-50' : 'border-paper-line hover:bg-paper-sunk/50'}`}>
                <input id={`${inputId}-f${f.id}`} type="radio" name="control-file" className="mt-1 accent-matrix-700" checked={selected === f.id} onChange={() => onSelect(f.id)} />
                <div className="min-w-0">
                  <label htmlFor={`${inputId}-f${f.id}`} className="block cursor-pointer truncate font-medium">
                    {f.filename}
                  </label>
                  <span className="block text-xs text-ink-faint">
                    #{f.id} · {formatBytes(f.sizeBytes)} · {f.uploadedByName ?? 'unknown'} · {formatWhen(f.createdAt)} ·{' '}
                    <a className="underline" href={controlFileHref(f.id)} download>
                      download
                    </a>
                  </span>
                </div>
              </div>
            </li>
          ))}
        </ul>
      </fieldset>
      <form
        className="flex flex-col gap-2 rounded-md border border-dashed border-matrix-300 p-4"
        onSubmit={(e) => {
          e.preventDefault();
          const file = inputRef.current?.files?.[0];
          if (file) upload.mutate(file, { onSuccess: (stored) => onSelect(stored.id) });
        }}
      >
        <label htmlFor={inputId} className="text-sm font-medium text-ink-soft">
          Upload a control file (CSV)
        </label>
        <input id={inputId} ref={inputRef} type="file" accept=".csv,text/csv" className="text-sm file:mr-3 file:rounded-md file:border-0 file:bg-matrix-100 file:px-3 file:py-1.5 file:text-matrix-800" />
        <p className="text-xs text-ink-faint">
          One row per control subject: <code>specimen_type</code>, <code>age_years</code>, optional <code>control_id</code> and{' '}
          <code>unit</code>, then one column per assay (CI, CII, CIII, CIV, CI+III, CII+III, CS), a unit in the header such as{' '}
          <code>CI (nmol/min/mg)</code>. Empty cells mean not measured. The file is kept with its SHA-256.
        </p>
        <div>
          <Button type="submit" variant="secondary" disabled={upload.isPending}>
            {upload.isPending ? 'Reading…' : 'Upload and read'}
          </Button>
        </div>
        {upload.error ? <FileProblems error={upload.error} /> : null}
        {upload.data ? (
          <Notice tone="success">
            {upload.data.alreadyStored ? 'This exact file was already stored; it is selected.' : `Stored ${upload.data.filename}: ${upload.data.data.rowCount} control subjects.`}
          </Notice>
        ) : null}
      </form>
    </div>
  );
}
