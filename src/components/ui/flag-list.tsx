import { flagTitles, type Flag } from '@/schemas/assay';

/** Every flag in plain words, then its numbers, with its code in small print, so a missing or doubtful number always says why. */
export function FlagList({
  flags,
  empty = 'No flags.',
  size = 'xs',
}: {
  flags: readonly Flag[];
  empty?: string | null;
  size?: 'xs' | 'sm';
}) {
  if (flags.length === 0) return empty ? <p className="text-sm text-within">{empty}</p> : null;
  return (
    <ul aria-label="Flags" className="flex flex-col gap-1">
      {flags.map((f, i) => (
        <li
          key={`${f.code}-${i}`}
          className={`rounded-md border border-caution-line bg-caution-bg px-2.5 py-1 text-caution ${size === 'sm' ? 'text-sm' : 'text-xs'}`}
        >
          <span className="mr-1.5 font-semibold">{flagTitles[f.code]}.</span>
          {f.message}
          <span className="ml-1.5 font-mono text-[0.7rem] opacity-80">({f.code})</span>
        </li>
      ))}
    </ul>
  );
}
