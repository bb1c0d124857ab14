// npm run create-admin -- --email <address> [--name "<full name>"]: an administrator account, from the shell.
// The password comes from ADMIN_PASSWORD, a hidden prompt, or the first line of stdin; never from the arguments.
import { parseArgs } from 'node:util';
import { z } from 'zod';
import { databaseLocationFrom, firstAdminPasswordSchema } from '../server/config';
import { initModels } from '../server/db/models';
import { migrate } from '../server/db/migrate';
import { openDatabase } from '../server/db/sequelize';
import { AppError } from '../server/lib/errors';
import { OperationRefused } from '../server/ops/backup';
import { runCommand, UsageError } from '../server/ops/cli';
import { countActiveAdministrators, createAdministrator } from '../server/ops/first-admin';
import { readSecret } from '../server/ops/read-secret';

const usage = 'npm run create-admin -- --email <address> [--name "<full name>"]   (password: ADMIN_PASSWORD, prompt or stdin)';

runCommand('create-admin', usage, async () => {
  let values: { email?: string; name?: string };
  try {
    ({ values } = parseArgs({ args: process.argv.slice(2), options: { email: { type: 'string' }, name: { type: 'string' } }, strict: true }));
  } catch (err) {
    const onCommandLine = process.argv.slice(2).some((a) => a.startsWith('--password'));
    throw new UsageError(onCommandLine ? 'the password is never taken from the command line' : (err as Error).message);
  }
  const email = z.email().max(254).safeParse(values.email ?? '');
  if (!email.success) throw new UsageError(values.email ? `--email: "${values.email}" is not an e-mail address` : '--email is required');
  const name = (values.name ?? 'Laboratory administrator').trim().slice(0, 120) || 'Laboratory administrator';

  const password = firstAdminPasswordSchema.safeParse(await readSecret('ADMIN_PASSWORD', 'Password for the new administrator'));
  if (!password.success) throw new OperationRefused(`password: ${password.error.issues[0]!.message}`);

  const sequelize = await openDatabase(databaseLocationFrom());
  try {
    initModels(sequelize);
    await migrate(sequelize);
    const before = await countActiveAdministrators();
    const account = await createAdministrator(sequelize, { email: email.data, password: password.data, name }, 'npm run create-admin');
    console.log(`administrator ${account.email} created (id ${account.id}); ${before} other active administrator(s)`);
  } catch (err) {
    if (err instanceof AppError) throw new OperationRefused(err.message);
    throw err;
  } finally {
    await sequelize.close();
  }
});
