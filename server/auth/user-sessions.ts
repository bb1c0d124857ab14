import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { storedLoginUserId } from './passport';
import { forgetEverywhere } from '../db/forget-everywhere';

/**
 * Ends every stored session of one account (OWASP ASVS 4.0, 3.3.3 and 3.3.4): deletes the rows of the session
 * table and, once the transaction commits, drops them from the in-memory session caches of every server. The account's session
 * generation, raised in the same transaction, refuses any copy still in flight. A laboratory keeps few sessions,
 * so the rows are read and matched here rather than indexed by user.
 */
export async function endSessionsOfUser(sequelize: Sequelize, userId: number, transaction: Transaction): Promise<number> {
  const rows = await sequelize.query<{ sid: string; data: string | null }>('SELECT sid, data FROM "Sessions"', {
    type: QueryTypes.SELECT,
    transaction,
  });
  const sids = rows
    .filter((r) => {
      try {
        const data = JSON.parse(r.data ?? 'null') as { passport?: { user?: unknown } } | null;
        return storedLoginUserId(data?.passport?.user) === userId;
      } catch {
        return false;
      }
    })
    .map((r) => r.sid);
  if (sids.length === 0) return 0;
  await sequelize.query('DELETE FROM "Sessions" WHERE sid IN (:sids)', { replacements: { sids }, transaction });
  transaction.afterCommit(() => forgetEverywhere({ sessions: sids }));
  return sids.length;
}
