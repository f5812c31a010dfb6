CREATE TABLE "audit_chain" (
	"position" bigint PRIMARY KEY NOT NULL,
	"event_id" bigint NOT NULL,
	"prev_hash" text NOT NULL,
	"hash" text NOT NULL,
	"sealed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "audit_chain_position_positive" CHECK ("audit_chain"."position" > 0),
	CONSTRAINT "audit_chain_hash_format" CHECK ("audit_chain"."hash" ~ '^[0-9a-f]{64}$' AND "audit_chain"."prev_hash" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
CREATE TABLE "audit_chain_pending" (
	"event_id" bigint PRIMARY KEY NOT NULL
);
--> statement-breakpoint
ALTER TABLE "audit_chain" ADD CONSTRAINT "audit_chain_event_id_audit_events_id_fk" FOREIGN KEY ("event_id") REFERENCES "public"."audit_events"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_chain_pending" ADD CONSTRAINT "audit_chain_pending_event_id_audit_events_id_fk" FOREIGN KEY ("event_id") REFERENCES "public"."audit_events"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "audit_chain_event_unique" ON "audit_chain" USING btree ("event_id");--> statement-breakpoint
-- Written by hand from here on: Drizzle cannot express triggers.
--
-- Every new audit event is queued for the hash chain in its own transaction: an AFTER INSERT
-- trigger adds its id to audit_chain_pending. The chain itself is written after commit by the
-- sealer (db/audit-chain.ts), so no audited transaction waits for another one's commit; see
-- DEVELOPERS.md, "Audit hash chain".
CREATE OR REPLACE FUNCTION bellwether_queue_audit_event() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO audit_chain_pending (event_id) VALUES (NEW.id);
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER audit_events_queue_for_chain
  AFTER INSERT ON audit_events
  FOR EACH ROW EXECUTE FUNCTION bellwether_queue_audit_event();
--> statement-breakpoint
-- The chain is append-only like the events it links.
CREATE OR REPLACE FUNCTION bellwether_reject_chain_change() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'audit_chain is append-only: % is not allowed', TG_OP
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER audit_chain_no_update_delete
  BEFORE UPDATE OR DELETE ON audit_chain
  FOR EACH ROW EXECUTE FUNCTION bellwether_reject_chain_change();
--> statement-breakpoint
CREATE TRIGGER audit_chain_no_truncate
  BEFORE TRUNCATE ON audit_chain
  FOR EACH STATEMENT EXECUTE FUNCTION bellwether_reject_chain_change();
--> statement-breakpoint
-- Events written before this migration are queued in id order; db/migrate.ts seals them right
-- after the migration run, so an existing trail is chained before the app serves again.
INSERT INTO audit_chain_pending (event_id) SELECT id FROM audit_events ORDER BY id;
