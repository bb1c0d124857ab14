import type { RunQcStamp, RunQcStatus } from '@/schemas/run';
import { AppError } from '../../lib/errors';

/*
 * The release gate of issue 12: a result may be submitted for review only when its run's controls were accepted
 * (a 1-2s warning passes), or a director released the run with a documented override.
 */

/** Statuses that keep a run's results from release unless a director overrides. */
export const blockingStatuses: ReadonlySet<RunQcStatus> = new Set<RunQcStatus>(['reject', 'none']);

/** True when a result from this run may be released: accepted, accepted with a warning, or overridden. */
export function runReleased(stamp: RunQcStamp): boolean {
  return !blockingStatuses.has(stamp.qcStatus) || stamp.overrideReason !== null;
}

/** 409 QC_NOT_ACCEPTED naming the runs whose results hold the case back. */
export function qcNotAccepted(accession: string, runNumbers: string[]): AppError {
  const runs = `run${runNumbers.length > 1 ? 's' : ''} ${runNumbers.join(', ')}`;
  return new AppError(
    'QC_NOT_ACCEPTED',
    `Case ${accession} cannot be submitted for review: results come from ${runs}, whose quality control was not accepted. ` +
      'A director can release such a run with a documented override, or leave those replicates out.',
  );
}

/** How the report words a run's release. */
export function describeRunRelease(stamp: RunQcStamp): string {
  if (stamp.overrideReason !== null) return `quality control not accepted; released by a director: ${stamp.overrideReason}`;
  if (stamp.qcStatus === 'warn') return 'quality control accepted with a warning (1-2s)';
  if (stamp.qcStatus === 'accept') return 'quality control accepted';
  return stamp.qcStatus === 'reject' ? 'quality control rejected' : 'no control evaluated';
}
