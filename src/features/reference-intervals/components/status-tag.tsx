import type { StoredInterval } from '@/schemas/reference-interval-api';
import { statusNames, todayIso } from './interval-text';

const tones = {
  draft: 'border-copper-300 bg-copper-50 text-copper-700',
  approved: 'border-matrix-300 bg-matrix-50 text-matrix-800',
  retired: 'border-paper-line bg-paper-sunk text-ink-faint',
};

/** Status in words; "ended" and "starts" qualify an approved version outside today's period. */
export function StatusTag({ interval }: { interval: Pick<StoredInterval, 'status' | 'effectiveFrom' | 'effectiveTo'> }) {
  const today = todayIso();
  let qualifier = '';
  if (interval.status === 'draft') qualifier = ' · awaiting a second director';
  if (interval.status === 'approved') {
    if (interval.effectiveFrom > today) qualifier = ` · starts ${interval.effectiveFrom}`;
    else if (interval.effectiveTo !== null && interval.effectiveTo <= today) qualifier = ' · superseded';
    else qualifier = ' · in use';
  }
  return (
    <span className={`inline-block whitespace-nowrap rounded border px-1.5 py-0.5 text-xs font-medium ${tones[interval.status]}`}>
      {statusNames[interval.status]}
      {qualifier}
    </span>
  );
}
