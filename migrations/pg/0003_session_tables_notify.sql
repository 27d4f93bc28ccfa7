-- The tables a request's session check reads (sessions, users, sites): any change to them, by any process or by
-- hand, notifies channel yp_session_tables when it commits, so every server process drops the session rows it
-- keeps (server/services/auth.ts). Per statement: a sign-in or a sign-out is one notification.
CREATE FUNCTION yp_notify_session_tables() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('yp_session_tables', '');
  RETURN NULL;
END;
$$;--> statement-breakpoint
CREATE TRIGGER sessions_notify AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON "sessions" FOR EACH STATEMENT EXECUTE FUNCTION yp_notify_session_tables();--> statement-breakpoint
CREATE TRIGGER users_notify AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON "users" FOR EACH STATEMENT EXECUTE FUNCTION yp_notify_session_tables();--> statement-breakpoint
CREATE TRIGGER sites_notify AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON "sites" FOR EACH STATEMENT EXECUTE FUNCTION yp_notify_session_tables();
