import type { QueryInterface } from 'sequelize';

/*
 * PostgreSQL variants of the SQLite triggers that make rows immutable (`SELECT RAISE(ABORT, '…')`): one shared
 * function raises the message the trigger passes it, so the error text is the same on both databases.
 * Used by migrations only; what a migration created through here must never change.
 */
const FUNCTION = 'cristae_refuse_change';

async function ensureRefuseFunction(qi: QueryInterface): Promise<void> {
  await qi.sequelize.query(
    `CREATE OR REPLACE FUNCTION ${FUNCTION}() RETURNS trigger LANGUAGE plpgsql AS $$
     BEGIN RAISE EXCEPTION '%', TG_ARGV[0] USING ERRCODE = 'restrict_violation'; END $$`,
  );
}

const quoteLiteral = (s: string) => `'${s.replaceAll("'", "''")}'`;

/**
 * A BEFORE trigger named `name` on `table` that refuses the statement with `message`: on every UPDATE (or only
 * an UPDATE that sets one of `columns`, as SQLite's `UPDATE OF` does) or DELETE.
 */
export async function refuseOnPostgres(
  qi: QueryInterface,
  name: string,
  table: string,
  event: 'UPDATE' | 'DELETE',
  message: string,
  columns: readonly string[] = [],
): Promise<void> {
  await ensureRefuseFunction(qi);
  const of = event === 'UPDATE' && columns.length ? ` OF ${columns.map((c) => `"${c}"`).join(', ')}` : '';
  await qi.sequelize.query(
    `CREATE TRIGGER ${name} BEFORE ${event}${of} ON "${table}" FOR EACH ROW EXECUTE FUNCTION ${FUNCTION}(${quoteLiteral(message)})`,
  );
}
