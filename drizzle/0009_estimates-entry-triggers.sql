-- Estimates keep their entry through statement-level triggers instead of a foreign key: the foreign
-- key checked each of an entry's up to 100,000 rows one by one (about 1 s of the 2.3 s a full
-- entry took to store on PGlite, bench/entries.bench.ts). The same two rules, once per statement:
-- every inserted or updated row names an existing entry (locked FOR KEY SHARE, as a foreign key
-- locks it, so a concurrent delete waits), and deleting entries deletes their estimates (the
-- cascade, also when the entries go by another table's cascade).
ALTER TABLE "estimates" DROP CONSTRAINT "estimates_entry_id_entries_id_fk";
--> statement-breakpoint
DELETE FROM "estimates" es WHERE NOT EXISTS (SELECT 1 FROM "entries" e WHERE e.id = es.entry_id);
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimates_entry_exists() RETURNS trigger AS $$
DECLARE
  wanted bigint;
  found bigint;
BEGIN
  SELECT count(DISTINCT entry_id) INTO wanted FROM new_rows;
  SELECT count(*) INTO found FROM (
    SELECT e.id FROM entries e WHERE e.id IN (SELECT DISTINCT entry_id FROM new_rows) FOR KEY SHARE
  ) s;
  IF found < wanted THEN
    RAISE EXCEPTION USING ERRCODE = 'foreign_key_violation',
      MESSAGE = 'insert or update on table "estimates" violates the entry link: entry_id is not an entry';
  END IF;
  RETURN NULL;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER estimates_entry_exists_insert AFTER INSERT ON "estimates"
  REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION estimates_entry_exists();
--> statement-breakpoint
CREATE TRIGGER estimates_entry_exists_update AFTER UPDATE ON "estimates"
  REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION estimates_entry_exists();
--> statement-breakpoint
CREATE OR REPLACE FUNCTION entries_delete_estimates() RETURNS trigger AS $$
BEGIN
  DELETE FROM estimates WHERE entry_id IN (SELECT id FROM old_rows);
  RETURN NULL;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER entries_delete_estimates AFTER DELETE ON "entries"
  REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION entries_delete_estimates();
