import { Button } from '@/components/ui/button';
import { ApiError } from '@/lib/api-client';

/** True for the 409 that means someone else saved the same record first. */
export function isStale(err: unknown): boolean {
  return err instanceof ApiError && err.code === 'STALE_VERSION';
}

/** The second of two saves: say so plainly and offer to load the other person's change. */
export function StaleNotice({ message, onReload }: { message: string; onReload: () => void }) {
  return (
    <div role="alert" className="flex flex-wrap items-center justify-between gap-3 rounded-md border border-copper-300 bg-copper-50 px-3 py-2 text-sm text-copper-700">
      <span>{message}</span>
      <Button variant="secondary" onClick={onReload}>
        Reload the latest version
      </Button>
    </div>
  );
}
