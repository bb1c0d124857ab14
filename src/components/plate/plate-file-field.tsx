import { useId } from 'react';
import { MAX_PLATE_FILE_BYTES } from '@/schemas/plate';

/**
 * The plate-reader export to read: a file chooser that refuses a file over the size limit before it is sent
 * (`onFile(null, message)`), and otherwise hands the file on.
 */
export function PlateFileField({ onFile, hint }: { onFile: (file: File | null, problem: string | null) => void; hint?: string }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium text-ink-soft">
        Plate file (CSV or tab-separated text)
      </label>
      <input
        id={id}
        type="file"
        accept=".csv,.tsv,.txt,text/csv,text/plain,text/tab-separated-values"
        className="text-sm"
        onChange={(e) => {
          const f = e.target.files?.[0] ?? null;
          if (f && f.size > MAX_PLATE_FILE_BYTES) onFile(null, `The file is ${(f.size / 1048576).toFixed(2)} MiB; the largest accepted is 2 MiB.`);
          else onFile(f, null);
        }}
      />
      <p className="text-xs text-ink-faint">{hint ?? 'Time in seconds in the first column, one column per well (see the plate file layout in the documentation).'}</p>
    </div>
  );
}
