// npm run backup -- <file>: an online, verified copy of the database (see server/ops/backup.ts).
import { databasePathFrom } from '../server/config';
import { backupDatabase } from '../server/ops/backup';
import { fileArgument, refuseWithPostgres, runCommand } from '../server/ops/cli';
import { describeReport } from '../server/ops/verify-database';

runCommand('backup', 'npm run backup -- <file>   (DATABASE_PATH names the database)', async () => {
  refuseWithPostgres();
  const file = fileArgument(process.argv.slice(2));
  const report = await backupDatabase(databasePathFrom(), file);
  console.log([...describeReport(report), `backup written and verified: ${file}`].join('\n'));
});
