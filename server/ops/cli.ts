import { logError } from '../lib/log';
import { OperationRefused } from './backup';
import { describeReport } from './verify-database';

/** Usage mistakes: exit status 2 with the usage line. */
export class UsageError extends Error {}

/**
 * Runs an operations command: status 0 when it succeeds, 1 with a plain reason (and the checks' findings) when
 * it is refused, 2 for a usage mistake.
 */
export function runCommand(name: string, usage: string, work: () => Promise<void>): void {
  work().then(
    () => process.exit(0),
    (err: unknown) => {
      if (err instanceof UsageError) {
        console.error(`${name}: ${err.message}\nusage: ${usage}`);
        process.exit(2);
      }
      if (err instanceof OperationRefused) {
        console.error([`${name} refused: ${err.message}`, ...(err.report ? describeReport(err.report) : [])].join('\n'));
        process.exit(1);
      }
      logError(err, name);
      process.exit(1);
    },
  );
}

/** The one file argument of backup and restore. */
export function fileArgument(argv: string[]): string {
  const files = argv.filter((a) => !a.startsWith('--'));
  if (files.length !== 1) throw new UsageError(files.length ? 'give exactly one file' : 'give the backup file');
  return files[0]!;
}

/** Backup and restore copy the SQLite file; a PostgreSQL database (DATABASE_URL) is copied with its own tools. */
export function refuseWithPostgres(env: NodeJS.ProcessEnv = process.env): void {
  if (env.DATABASE_URL) {
    throw new OperationRefused('DATABASE_URL selects PostgreSQL; copy it with pg_dump and pg_restore (see README, "Databases")');
  }
}
