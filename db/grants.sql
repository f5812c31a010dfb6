-- What Bellwether's application role may do. db/migrate.ts runs this file as the owner of the
-- schema after every migration run, in one transaction, so a table added by a later migration is
-- covered without anyone remembering. It first takes everything away from the app's role, then
-- grants exactly the list below, so running it again changes nothing.
--
-- Roles (the README's "Database roles" section says how to create them on your own server):
--   the owner            owns the database, the schema objects and drizzle's bookkeeping; only
--                        migrations use it (BELLWETHER_MIGRATION_URL).
--   bellwether_app       what the app connects as (DATABASE_URL): no DDL, no TRUNCATE, and only
--                        INSERT and SELECT on the append-only tables, whose triggers it cannot
--                        disable because ALTER TABLE needs ownership.
--
-- No ALTER DEFAULT PRIVILEGES on purpose: a new append-only table would otherwise be writable by
-- the app in full until this file ran; with explicit grants it is simply unreachable until then.

-- Start from nothing.
REVOKE ALL ON ALL TABLES IN SCHEMA public FROM PUBLIC, bellwether_app;
REVOKE ALL ON ALL SEQUENCES IN SCHEMA public FROM PUBLIC, bellwether_app;
REVOKE ALL ON SCHEMA public FROM bellwether_app;

-- No DDL: nobody but the owner creates objects in the schema or the database. (PostgreSQL 15
-- already keeps CREATE on public from PUBLIC; older servers granted it to everyone.)
REVOKE CREATE ON SCHEMA public FROM PUBLIC;
GRANT USAGE ON SCHEMA public TO bellwether_app;
DO $database$
BEGIN
  EXECUTE format('REVOKE CREATE, TEMPORARY ON DATABASE %I FROM PUBLIC', current_database());
  EXECUTE format('GRANT CONNECT ON DATABASE %I TO bellwether_app', current_database());
END
$database$;

-- Reading and writing the domain tables, except the append-only ones.
DO $tables$
DECLARE
  -- Tables whose rows, once written, are never changed or removed (their triggers refuse UPDATE,
  -- DELETE and TRUNCATE too). The app may read them and add to them, nothing else. A name here
  -- whose table does not exist yet is skipped until a migration creates it.
  append_only CONSTANT text[] := ARRAY['audit_events', 'audit_chain', 'signatures'];
  t record;
BEGIN
  FOR t IN
    SELECT c.relname
    FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
    WHERE n.nspname = 'public' AND c.relkind IN ('r', 'p')
  LOOP
    IF t.relname = ANY (append_only) THEN
      EXECUTE format('GRANT SELECT, INSERT ON public.%I TO bellwether_app', t.relname);
    ELSE
      EXECUTE format('GRANT SELECT, INSERT, UPDATE, DELETE ON public.%I TO bellwether_app', t.relname);
    END IF;
  END LOOP;
END
$tables$;

-- nextval() for serial and identity columns; USAGE does not allow setval().
GRANT USAGE ON ALL SEQUENCES IN SCHEMA public TO bellwether_app;

-- Drizzle's migration bookkeeping belongs to the owner alone.
REVOKE ALL ON SCHEMA drizzle FROM PUBLIC, bellwether_app;
REVOKE ALL ON ALL TABLES IN SCHEMA drizzle FROM PUBLIC, bellwether_app;
REVOKE ALL ON ALL SEQUENCES IN SCHEMA drizzle FROM PUBLIC, bellwether_app;

-- The one thing the app may know about that bookkeeping: the timestamp of the newest migration
-- applied, so that `npm start` without BELLWETHER_MIGRATION_URL can tell whether the schema is
-- current without being able to read or change the bookkeeping itself.
CREATE OR REPLACE FUNCTION public.bellwether_schema_version() RETURNS bigint
  LANGUAGE sql STABLE SECURITY DEFINER
  SET search_path = pg_catalog, pg_temp
  AS $$ SELECT max(created_at) FROM drizzle.__drizzle_migrations $$;
REVOKE ALL ON FUNCTION public.bellwether_schema_version() FROM PUBLIC;
GRANT EXECUTE ON FUNCTION public.bellwether_schema_version() TO bellwether_app;
