import type { ControlCsvIssue } from '@/schemas/reference-interval';
import { parseControlCsv } from '../../server/domain/reference-stats/control-csv';
import { ControlCsvError } from '../../server/domain/reference-stats/errors';

/** The issues a refused control-data file is refused with; fails when the file is accepted. */
export function issuesOf(text: string): ControlCsvIssue[] {
  try {
    parseControlCsv(text);
  } catch (error) {
    if (error instanceof ControlCsvError) return error.issues;
    throw error;
  }
  throw new Error('expected the file to be refused');
}
