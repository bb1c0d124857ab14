import { caseListQuerySchema, type CaseListQuery } from '@/schemas/case';

export const DEFAULT_PAGE_SIZE = 25;
export const pageSizes = [25, 50, 100, 200] as const;

const keys = Object.keys(caseListQuerySchema.shape) as (keyof CaseListQuery)[];

/**
 * The list's state lives in the address bar, so a view can be bookmarked and shared. Each parameter is read
 * with the shared list-query schema; one that does not parse (an edited link) is dropped, not fatal.
 */
export function readListParams(params: URLSearchParams): CaseListQuery {
  const out: Record<string, unknown> = {};
  for (const key of keys) {
    const raw = params.get(key);
    if (raw === null || raw === '') continue;
    const parsed = caseListQuerySchema.shape[key].safeParse(raw);
    if (parsed.success && parsed.data !== undefined) out[key] = parsed.data;
  }
  return out as CaseListQuery;
}

/** Writes a change to the list's state; any change other than paging returns to the first page. */
export function writeListParams(current: URLSearchParams, change: Partial<Record<keyof CaseListQuery, string | number | null | undefined>>): URLSearchParams {
  const next = new URLSearchParams(current);
  for (const [k, v] of Object.entries(change)) {
    if (v === undefined || v === null || v === '') next.delete(k);
    else next.set(k, String(v));
  }
  if (!('page' in change)) next.delete('page');
  return next;
}

export function hasFilters(q: CaseListQuery): boolean {
  return Boolean(q.q || q.state || q.specimenType || q.pattern || q.from || q.to);
}
