import {
  describePlateIssue,
  MAX_PLATE_ISSUES,
  type PlateIssue,
  type PlateIssueCode,
} from '@/schemas/plate';

/**
 * A plate file or plate map that cannot be imported. Nothing is returned alongside it: either the
 * whole file reads cleanly or the caller gets every problem found (the first MAX_PLATE_ISSUES of
 * them, in file order) and `totalIssues` says how many there were in all.
 */
export class PlateImportError extends Error {
  readonly code = 'PLATE_IMPORT_FAILED' as const;
  readonly issues: PlateIssue[];
  readonly totalIssues: number;

  constructor(issues: PlateIssue[], totalIssues: number = issues.length) {
    const first = issues[0];
    const summary = first ? describePlateIssue(first) : 'unknown problem';
    const more = totalIssues > 1 ? ` (and ${totalIssues - 1} more)` : '';
    super(`The plate file could not be imported: ${summary}${more}`);
    this.name = 'PlateImportError';
    this.issues = issues;
    this.totalIssues = totalIssues;
  }
}

export interface IssueLocation {
  row?: number | null;
  column?: string | null;
  columnNumber?: number | null;
}

/** Collects issues up to the cap and keeps counting past it. */
export class IssueList {
  private readonly items: PlateIssue[] = [];
  private count = 0;

  constructor(private readonly cap: number = MAX_PLATE_ISSUES) {}

  add(code: PlateIssueCode, message: string, at: IssueLocation = {}): void {
    this.count += 1;
    if (this.items.length < this.cap) {
      this.items.push({
        code,
        row: at.row ?? null,
        column: at.column ?? null,
        columnNumber: at.columnNumber ?? null,
        message,
      });
    }
  }

  get size(): number {
    return this.count;
  }

  throwIfAny(): void {
    if (this.count > 0) this.fail();
  }

  /** Throws what has been collected; call only after adding at least one issue. */
  fail(): never {
    throw new PlateImportError([...this.items], this.count);
  }
}

/** Throws a PlateImportError with a single issue. */
export function failWith(code: PlateIssueCode, message: string, at: IssueLocation = {}): never {
  const list = new IssueList();
  list.add(code, message, at);
  return list.fail();
}
