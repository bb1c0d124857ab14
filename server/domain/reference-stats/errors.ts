import type { ControlCsvIssue } from '@/schemas/reference-interval';

/**
 * Input that the statistics cannot work with (too few values, no spread, limits in the wrong order).
 * `field` names the request field at fault. The HTTP layer maps this to 400 with
 * `fieldErrors: { [field]: [message] }`; `status` and `code` are here so a generic mapper can do that.
 */
export class ReferenceStatsInputError extends Error {
  readonly status = 400;
  readonly code = 'VALIDATION_FAILED';
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = 'ReferenceStatsInputError';
  }

  get fieldErrors(): Record<string, string[]> {
    return { [this.field]: [this.message] };
  }
}

/**
 * A control-data file that cannot be read. Carries every problem found, each naming its row and column;
 * the parser returns nothing when it throws this. Maps to 400.
 */
export class ControlCsvError extends Error {
  readonly status = 400;
  readonly code = 'VALIDATION_FAILED';
  constructor(readonly issues: ControlCsvIssue[]) {
    super(ControlCsvError.summarise(issues));
    this.name = 'ControlCsvError';
  }

  private static summarise(issues: ControlCsvIssue[]): string {
    const first = issues[0];
    if (!first) return 'The control-data file could not be read';
    const where = [
      first.row === null ? null : `row ${first.row}`,
      first.column === null ? null : `column "${first.column}"`,
    ]
      .filter((part) => part !== null)
      .join(', ');
    const more = issues.length > 1 ? ` (and ${issues.length - 1} more problem(s))` : '';
    return `${where ? `${where}: ` : ''}${first.message}${more}`;
  }
}
