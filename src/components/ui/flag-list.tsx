import type { Flag } from '@/schemas/assay';

/** Every flag in words, with its code, so a missing or doubtful number always says why. */
export function FlagList({ flags, empty = 'No flags.' }: { flags: readonly Flag[]; empty?: string | null }) {
  if (flags.length === 0) return empty ? <p className="text-sm text-within">{empty}</p> : null;
  return (
    <ul aria-label="Flags" className="flex flex-col gap-1">
      {flags.map((f, i) => (
        <li key={`${f.code}-${i}`} className="rounded-md border border-caution-line bg-caution-bg px-2.5 py-1 text-xs text-caution">
          <span className="mr-1.5 font-mono font-semibold">{f.code}</span>
          {f.message}
        </li>
      ))}
    </ul>
  );
}
