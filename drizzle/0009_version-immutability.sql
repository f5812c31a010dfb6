-- Written by hand: Drizzle cannot express triggers. Interval versions that have left draft, their
-- partitions and their signatures are protected by the database itself, so that no code path
-- (nor a mistaken query run as the app's role) can change what a director signed. The moves the
-- design allows (lib/versions/state-machine.ts) are the only updates, and each may change only its
-- own columns.
CREATE OR REPLACE FUNCTION bellwether_guard_interval_version() RETURNS trigger
LANGUAGE plpgsql AS $$
DECLARE
  allowed text[];
BEGIN
  IF TG_OP = 'INSERT' THEN
    IF NEW.state <> 'draft' THEN
      RAISE EXCEPTION 'an interval version is created as a draft, not %', NEW.state
        USING ERRCODE = 'object_not_in_prerequisite_state';
    END IF;
    RETURN NEW;
  END IF;
  IF TG_OP = 'DELETE' THEN
    IF OLD.state <> 'draft' THEN
      RAISE EXCEPTION 'interval version % (number %) is %: only a draft can be deleted', OLD.id, OLD.number, OLD.state
        USING ERRCODE = 'object_not_in_prerequisite_state';
    END IF;
    RETURN OLD;
  END IF;
  IF OLD.state = 'draft' THEN
    IF NEW.state IN ('draft', 'awaiting_signoff') THEN
      RETURN NEW;
    END IF;
    RAISE EXCEPTION 'interval version % (number %) cannot move from draft to %', OLD.id, OLD.number, NEW.state
      USING ERRCODE = 'object_not_in_prerequisite_state';
  END IF;
  allowed := CASE
    WHEN OLD.state = 'awaiting_signoff' AND NEW.state = 'draft'
      THEN ARRAY['state', 'return_comment', 'returned_by', 'returned_at', 'submitted_by', 'submitted_at']
    WHEN OLD.state = 'awaiting_signoff' AND NEW.state = 'in_force'
      THEN ARRAY['state', 'effective_from', 'review_by']
    WHEN OLD.state = 'in_force' AND NEW.state = 'in_force'
      THEN ARRAY['review_by', 'effective_to']
    WHEN OLD.state = 'in_force' AND NEW.state = 'superseded'
      THEN ARRAY['state', 'effective_to']
    WHEN OLD.state = 'in_force' AND NEW.state = 'withdrawn'
      THEN ARRAY['state', 'effective_to', 'withdrawn_by', 'withdrawn_at', 'withdrawn_reason']
    WHEN OLD.state = 'superseded' AND NEW.state = 'in_force'
      THEN ARRAY['state', 'effective_from', 'effective_to', 'review_by']
  END;
  IF allowed IS NULL THEN
    RAISE EXCEPTION 'interval version % (number %) is %: it cannot be changed to %', OLD.id, OLD.number, OLD.state, NEW.state
      USING ERRCODE = 'object_not_in_prerequisite_state';
  END IF;
  IF (to_jsonb(NEW) - allowed) IS DISTINCT FROM (to_jsonb(OLD) - allowed) THEN
    RAISE EXCEPTION 'interval version % (number %) is %: moving it to % may change only %', OLD.id, OLD.number, OLD.state, NEW.state, array_to_string(allowed, ', ')
      USING ERRCODE = 'object_not_in_prerequisite_state';
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER interval_versions_guard
  BEFORE INSERT OR UPDATE OR DELETE ON interval_versions
  FOR EACH ROW EXECUTE FUNCTION bellwether_guard_interval_version();
--> statement-breakpoint
-- A partition belongs to what was signed once its version leaves draft. The version's row is read
-- FOR SHARE so that a submission waits for a partition change in flight, and the reverse.
CREATE OR REPLACE FUNCTION bellwether_guard_interval_partition() RETURNS trigger
LANGUAGE plpgsql AS $$
DECLARE
  version_state text;
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN
    SELECT state INTO version_state FROM interval_versions WHERE id = OLD.version_id FOR SHARE;
    IF version_state IS DISTINCT FROM 'draft' THEN
      RAISE EXCEPTION 'the partitions of interval version % cannot change: it is %', OLD.version_id, version_state
        USING ERRCODE = 'object_not_in_prerequisite_state';
    END IF;
  END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN
    SELECT state INTO version_state FROM interval_versions WHERE id = NEW.version_id FOR SHARE;
    IF version_state IS DISTINCT FROM 'draft' THEN
      RAISE EXCEPTION 'the partitions of interval version % cannot change: it is %', NEW.version_id, version_state
        USING ERRCODE = 'object_not_in_prerequisite_state';
    END IF;
    RETURN NEW;
  END IF;
  RETURN OLD;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER interval_partitions_guard
  BEFORE INSERT OR UPDATE OR DELETE ON interval_partitions
  FOR EACH ROW EXECUTE FUNCTION bellwether_guard_interval_partition();
--> statement-breakpoint
-- Signatures are append-only like the audit trail: besides the grants (SELECT and INSERT only for
-- the app's role, db/grants.sql), these triggers refuse even the owner.
CREATE OR REPLACE FUNCTION bellwether_reject_signature_change() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'signatures is append-only: % is not allowed', TG_OP
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER signatures_no_update_delete
  BEFORE UPDATE OR DELETE ON signatures
  FOR EACH ROW EXECUTE FUNCTION bellwether_reject_signature_change();
--> statement-breakpoint
CREATE TRIGGER signatures_no_truncate
  BEFORE TRUNCATE ON signatures
  FOR EACH STATEMENT EXECUTE FUNCTION bellwether_reject_signature_change();
