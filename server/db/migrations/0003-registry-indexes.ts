import type { QueryInterface } from 'sequelize';

export const name = '0003-registry-indexes';

/*
 * Indexes for the case list at registry scale (see bench/cases-list.ts).
 * - cases_search: an FTS5 trigram index over cases.searchText (already lower-cased and accent-folded), so a
 *   search for any fragment of three or more characters finds its rows without reading the whole table.
 *   It stores no copy of the text (content='cases'); triggers keep it in step with the table.
 * - Plain indexes for the sorts the list offers (patient name, priority).
 * - One partial index per specimen type over the ",type," list column, so a type filter counts and pages
 *   without reading every case. The list query writes its condition in exactly this form.
 * - case_patterns: one row per finding of cases.patternCode (written by the results module as findings joined
 *   by "+" and specimens by "; ", e.g. "isolated:CI+raised_cs; normal"), with its kind ("isolated"), so the
 *   pattern filter is an index lookup. Triggers split the code whenever it is written; quotes and backslashes,
 *   which codes never contain, are dropped first so the JSON array built for json_each is always valid.
 */
/** The findings of a pattern code as a JSON array, for json_each. */
const findingsArray = (code: string) =>
  `'["' || replace(replace(replace(replace(${code}, '\\', ''), '"', ''), '; ', '","'), '+', '","') || '"]'`;
const kindOf = `CASE WHEN instr(j.value, ':') > 0 THEN substr(j.value, 1, instr(j.value, ':') - 1) ELSE j.value END`;

const specimenTypes = ['skeletal_muscle', 'liver', 'heart_muscle', 'fibroblasts', 'lymphoblasts', 'other'];

/*
 * PostgreSQL: the same three things in its own terms. A pg_trgm GIN index over "searchText" serves the search
 * box (LIKE '%fragment%'); the partial indexes test strpos() where SQLite tests instr(); one PL/pgSQL trigger
 * splits the pattern code into case_patterns on insert, on a change of "patternCode" and on delete.
 */
const pgFindings = (code: string) =>
  `regexp_split_to_table(replace(replace(${code}, '\\', ''), '"', ''), '; |\\+')`;

async function upPostgres(qi: QueryInterface): Promise<void> {
  const q = (sql: string) => qi.sequelize.query(sql);
  await q('CREATE EXTENSION IF NOT EXISTS pg_trgm');
  await q('CREATE INDEX cases_search ON cases USING gin ("searchText" gin_trgm_ops)');
  await qi.addIndex('cases', ['patientName'], { name: 'cases_patient_name' });
  await qi.addIndex('cases', ['priority', 'receivedAt'], { name: 'cases_priority_received_at' });
  for (const t of specimenTypes) {
    await q(`CREATE INDEX cases_type_${t} ON cases("receivedAt") WHERE strpos("specimenTypes", ',${t},') > 0`);
  }
  await q(`CREATE TABLE case_patterns ("caseId" INTEGER NOT NULL, item TEXT NOT NULL, kind TEXT NOT NULL)`);
  await q(`CREATE INDEX case_patterns_kind ON case_patterns(kind, "caseId")`);
  await q(`CREATE INDEX case_patterns_item ON case_patterns(item, "caseId")`);
  await q(`CREATE INDEX case_patterns_case ON case_patterns("caseId")`);
  await q(`CREATE FUNCTION case_patterns_sync() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP <> 'INSERT' THEN DELETE FROM case_patterns WHERE "caseId" = OLD.id; END IF;
      IF TG_OP <> 'DELETE' AND NEW."patternCode" IS NOT NULL THEN
        INSERT INTO case_patterns ("caseId", item, kind)
          SELECT DISTINCT NEW.id, f, split_part(f, ':', 1) FROM ${pgFindings('NEW."patternCode"')} AS f WHERE f <> '';
      END IF;
      RETURN NULL;
    END $$`);
  await q(`CREATE TRIGGER case_patterns_sync AFTER INSERT OR DELETE OR UPDATE OF "patternCode" ON cases
    FOR EACH ROW EXECUTE FUNCTION case_patterns_sync()`);
  await q(`INSERT INTO case_patterns ("caseId", item, kind)
      SELECT DISTINCT c.id, f, split_part(f, ':', 1) FROM cases AS c, ${pgFindings('c."patternCode"')} AS f
       WHERE c."patternCode" IS NOT NULL AND f <> ''`);
}

async function downPostgres(qi: QueryInterface): Promise<void> {
  const q = (sql: string) => qi.sequelize.query(sql);
  await q('DROP TRIGGER IF EXISTS case_patterns_sync ON cases');
  await q('DROP FUNCTION IF EXISTS case_patterns_sync()');
  await q('DROP TABLE IF EXISTS case_patterns');
  for (const t of specimenTypes) await q(`DROP INDEX IF EXISTS cases_type_${t}`);
  await qi.removeIndex('cases', 'cases_priority_received_at');
  await qi.removeIndex('cases', 'cases_patient_name');
  await q('DROP INDEX IF EXISTS cases_search');
}

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  if (qi.sequelize.getDialect() === 'postgres') return upPostgres(qi);
  const q = (sql: string) => qi.sequelize.query(sql);
  await q(`CREATE VIRTUAL TABLE cases_search USING fts5(searchText, content='cases', content_rowid='id', tokenize='trigram')`);
  await q(`CREATE TRIGGER cases_search_ai AFTER INSERT ON cases BEGIN
      INSERT INTO cases_search(rowid, searchText) VALUES (new.id, new.searchText);
    END`);
  await q(`CREATE TRIGGER cases_search_ad AFTER DELETE ON cases BEGIN
      INSERT INTO cases_search(cases_search, rowid, searchText) VALUES ('delete', old.id, old.searchText);
    END`);
  await q(`CREATE TRIGGER cases_search_au AFTER UPDATE OF searchText ON cases BEGIN
      INSERT INTO cases_search(cases_search, rowid, searchText) VALUES ('delete', old.id, old.searchText);
      INSERT INTO cases_search(rowid, searchText) VALUES (new.id, new.searchText);
    END`);
  await q(`INSERT INTO cases_search(cases_search) VALUES ('rebuild')`);
  await qi.addIndex('cases', ['patientName'], { name: 'cases_patient_name' });
  await qi.addIndex('cases', ['priority', 'receivedAt'], { name: 'cases_priority_received_at' });
  for (const t of specimenTypes) {
    await q(`CREATE INDEX cases_type_${t} ON cases(receivedAt) WHERE instr(specimenTypes, ',${t},') > 0`);
  }

  await q(`CREATE TABLE case_patterns (caseId INTEGER NOT NULL, item TEXT NOT NULL, kind TEXT NOT NULL)`);
  await q(`CREATE INDEX case_patterns_kind ON case_patterns(kind, caseId)`);
  await q(`CREATE INDEX case_patterns_item ON case_patterns(item, caseId)`);
  await q(`CREATE INDEX case_patterns_case ON case_patterns(caseId)`);
  await q(`CREATE TRIGGER case_patterns_ai AFTER INSERT ON cases WHEN new.patternCode IS NOT NULL BEGIN
      INSERT INTO case_patterns (caseId, item, kind)
        SELECT DISTINCT new.id, j.value, ${kindOf} FROM json_each(${findingsArray('new.patternCode')}) AS j WHERE j.value <> '';
    END`);
  await q(`CREATE TRIGGER case_patterns_au AFTER UPDATE OF patternCode ON cases BEGIN
      DELETE FROM case_patterns WHERE caseId = old.id;
      INSERT INTO case_patterns (caseId, item, kind)
        SELECT DISTINCT new.id, j.value, ${kindOf} FROM json_each(${findingsArray("coalesce(new.patternCode, '')")}) AS j WHERE j.value <> '';
    END`);
  await q(`CREATE TRIGGER case_patterns_ad AFTER DELETE ON cases BEGIN
      DELETE FROM case_patterns WHERE caseId = old.id;
    END`);
  await q(`INSERT INTO case_patterns (caseId, item, kind)
      SELECT DISTINCT c.id, j.value, ${kindOf} FROM cases AS c, json_each(${findingsArray('c.patternCode')}) AS j
       WHERE c.patternCode IS NOT NULL AND j.value <> ''`);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  if (qi.sequelize.getDialect() === 'postgres') return downPostgres(qi);
  for (const t of ['case_patterns_ad', 'case_patterns_au', 'case_patterns_ai']) await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${t}`);
  await qi.sequelize.query('DROP TABLE IF EXISTS case_patterns');
  for (const t of specimenTypes) await qi.sequelize.query(`DROP INDEX IF EXISTS cases_type_${t}`);
  await qi.removeIndex('cases', 'cases_priority_received_at');
  await qi.removeIndex('cases', 'cases_patient_name');
  for (const t of ['cases_search_au', 'cases_search_ad', 'cases_search_ai']) await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${t}`);
  await qi.sequelize.query('DROP TABLE IF EXISTS cases_search');
}
