-- Written by hand: Drizzle cannot express triggers. The audit trail is append-only, enforced by
-- the database itself so that no code path (nor a mistaken query) can rewrite or erase it.
CREATE OR REPLACE FUNCTION bellwether_reject_audit_change() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'audit_events is append-only: % is not allowed', TG_OP
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER audit_events_no_update_delete
  BEFORE UPDATE OR DELETE ON audit_events
  FOR EACH ROW EXECUTE FUNCTION bellwether_reject_audit_change();
--> statement-breakpoint
CREATE TRIGGER audit_events_no_truncate
  BEFORE TRUNCATE ON audit_events
  FOR EACH STATEMENT EXECUTE FUNCTION bellwether_reject_audit_change();
