import { Notice } from './layout';
import { formatWhen } from '@/utils/format';

/** Who is looking at a draft, and whether the laboratory lets a director approve their own drafts. */
export type ApprovalViewer = { userId: number; selfApprovalAllowed: boolean };

/**
 * Separation of duties, as the server enforces it: a draft is approved by a director other than its drafter,
 * or by its drafter when the laboratory profile allows self-approval (a single-director laboratory).
 */
export function mayApprove(viewer: ApprovalViewer, drafterId: number | null): boolean {
  return drafterId === null || drafterId !== viewer.userId || viewer.selfApprovalAllowed;
}

/** The plain-words state of a draft: who drafted it, and who can put it in use. */
export function AwaitingSecondDirector({
  viewer,
  drafterId,
  drafterName,
  draftedAt,
}: {
  viewer: ApprovalViewer;
  drafterId: number | null;
  drafterName: string | null;
  draftedAt: string;
}) {
  const mine = drafterId !== null && drafterId === viewer.userId;
  const drafted = `Drafted by ${mine ? 'you' : (drafterName ?? 'a director')} on ${formatWhen(draftedAt)}.`;
  let rest: string;
  if (!mine) rest = 'Nothing uses it until a second director approves it, and that can be you.';
  else if (viewer.selfApprovalAllowed) {
    rest = 'This laboratory has a single director, so you may approve it yourself; reports that use it will say so.';
  } else rest = 'Waiting for a second director: another director must approve it before anything uses it.';
  return (
    <Notice>
      {drafted} {rest}
    </Notice>
  );
}
