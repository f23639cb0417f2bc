-- The historian's database and roles (run once as a PostgreSQL superuser or the DBA, e.g. psql -f roles.sql).
-- zbin_owner owns the schema: the historian uses it for migrations, day partitions and retention (DROP of old days).
-- zbin_ingest writes the rows: it may INSERT and SELECT, never UPDATE, DELETE or TRUNCATE.
-- zbin_reader is for replay, tune, reports and SQL questions: SELECT only.
-- Set real passwords (ALTER ROLE … PASSWORD) or client certificates; the historian reads them from a file or the
-- environment (never from its config file itself).
CREATE ROLE zbin_owner LOGIN;
CREATE ROLE zbin_ingest LOGIN;
CREATE ROLE zbin_reader LOGIN;
CREATE DATABASE zbin OWNER zbin_owner;
\connect zbin
REVOKE CREATE ON SCHEMA public FROM PUBLIC;
GRANT CREATE, USAGE ON SCHEMA public TO zbin_owner;
GRANT USAGE ON SCHEMA public TO zbin_ingest, zbin_reader;
-- every table and view the owner creates (the migrations, each day's partition) is readable, and the tables insertable
ALTER DEFAULT PRIVILEGES FOR ROLE zbin_owner IN SCHEMA public GRANT SELECT, INSERT ON TABLES TO zbin_ingest;
ALTER DEFAULT PRIVILEGES FOR ROLE zbin_owner IN SCHEMA public GRANT SELECT ON TABLES TO zbin_reader;
