-- Blind rounds: a reference row written after a moderator sealed its target (the reference job
-- runs after the seal) takes the seal's date on the way in, so a value is never stored unsealed.
-- The newest seal of the version that covers the target and has not been revealed wins.
CREATE OR REPLACE FUNCTION references_apply_seal() RETURNS trigger AS $$
DECLARE
  until timestamptz;
BEGIN
  SELECT s.sealed_until INTO until
    FROM reference_seals s JOIN targets t ON t.version_id = s.version_id
    WHERE t.id = NEW.target_id AND s.revealed_at IS NULL AND (s.all_targets OR s.target_keys ? t.key)
    ORDER BY s.created_at DESC LIMIT 1;
  IF until IS NOT NULL AND (NEW.sealed_until IS NULL OR NEW.sealed_until < until) THEN
    NEW.sealed_until := until;
  END IF;
  RETURN NEW;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER references_apply_seal BEFORE INSERT ON "references"
  FOR EACH ROW EXECUTE FUNCTION references_apply_seal();
