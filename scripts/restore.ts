// npm run restore -- <file>: replaces the database with a verified backup; the server must be stopped.
import { databasePathFrom } from '../server/config';
import { fileArgument, refuseWithPostgres, runCommand } from '../server/ops/cli';
import { restoreDatabase } from '../server/ops/restore';
import { describeReport } from '../server/ops/verify-database';

runCommand('restore', 'npm run restore -- <file>   (stop the server first; DATABASE_PATH names the database)', async () => {
  refuseWithPostgres();
  const file = fileArgument(process.argv.slice(2));
  const target = databasePathFrom();
  const { report, previousKeptAs } = await restoreDatabase(file, target);
  const kept = previousKeptAs ? [`the replaced database is kept as ${previousKeptAs}`] : [];
  console.log([...describeReport(report), `restored ${file} to ${target}`, ...kept].join('\n'));
});
