-- Written by hand: Drizzle cannot express triggers. Each app instance keeps the in-force scoring
-- models and the LIS connections in memory; these triggers tell every instance, through
-- PostgreSQL's LISTEN/NOTIFY, when what it holds has changed. A notification is delivered only
-- when its transaction commits, so an instance that reloads on it reads the whole change.
--   bellwether_intervals        payload: the analyte's id (a version moved, a review date, the analyte)
--   bellwether_lis_connections  payload: the connection's id (created, revoked, renamed, limit)
CREATE OR REPLACE FUNCTION bellwether_notify_intervals() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  IF TG_TABLE_NAME = 'interval_versions' THEN
    IF TG_OP = 'INSERT' THEN
      RETURN NULL;
    END IF;
    IF TG_OP = 'DELETE' THEN
      PERFORM pg_notify('bellwether_intervals', OLD.analyte_id::text);
      RETURN NULL;
    END IF;
    IF OLD.state IS DISTINCT FROM NEW.state OR OLD.review_by IS DISTINCT FROM NEW.review_by
       OR OLD.effective_from IS DISTINCT FROM NEW.effective_from THEN
      PERFORM pg_notify('bellwether_intervals', NEW.analyte_id::text);
    END IF;
    RETURN NULL;
  END IF;
  -- analytes: the code, unit, LOINC code or molar mass that scoring reads may have changed.
  IF TG_OP = 'DELETE' THEN
    PERFORM pg_notify('bellwether_intervals', OLD.id::text);
  ELSE
    PERFORM pg_notify('bellwether_intervals', NEW.id::text);
  END IF;
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER interval_versions_notify
  AFTER UPDATE OR DELETE ON interval_versions
  FOR EACH ROW EXECUTE FUNCTION bellwether_notify_intervals();
--> statement-breakpoint
CREATE TRIGGER analytes_notify
  AFTER INSERT OR UPDATE OR DELETE ON analytes
  FOR EACH ROW EXECUTE FUNCTION bellwether_notify_intervals();
--> statement-breakpoint
CREATE OR REPLACE FUNCTION bellwether_notify_lis_connections() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  -- The last-used time is written once a minute per key; nobody needs telling of it.
  IF TG_OP = 'UPDATE' AND OLD.last_used_at IS DISTINCT FROM NEW.last_used_at
     AND ROW(OLD.name, OLD.contact_email, OLD.key_sha256, OLD.rate_per_minute, OLD.revoked_at)
         IS NOT DISTINCT FROM ROW(NEW.name, NEW.contact_email, NEW.key_sha256, NEW.rate_per_minute, NEW.revoked_at) THEN
    RETURN NULL;
  END IF;
  PERFORM pg_notify('bellwether_lis_connections', COALESCE(NEW.id, OLD.id)::text);
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER lis_connections_notify
  AFTER INSERT OR UPDATE OR DELETE ON lis_connections
  FOR EACH ROW EXECUTE FUNCTION bellwether_notify_lis_connections();
