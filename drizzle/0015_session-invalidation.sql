-- Every server instance keeps resolved sessions in memory (DEVELOPERS.md decision 45) and forgets
-- them when PostgreSQL says something they depend on changed: a session revoked or removed, a user
-- changed or disabled, a membership or role added, changed or removed, a project renamed or
-- removed. The notification is sent at commit (never for a rolled-back write) to every instance
-- listening on 'kerfwise_auth'; statement-level triggers, so a bulk write notifies once. Inserting
-- a session or a project changes no cached answer and does not notify.
CREATE FUNCTION notify_auth_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('kerfwise_auth', TG_TABLE_NAME);
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER sessions_auth_notify AFTER UPDATE OR DELETE OR TRUNCATE ON sessions
  FOR EACH STATEMENT EXECUTE FUNCTION notify_auth_change();
--> statement-breakpoint
CREATE TRIGGER users_auth_notify AFTER UPDATE OR DELETE OR TRUNCATE ON users
  FOR EACH STATEMENT EXECUTE FUNCTION notify_auth_change();
--> statement-breakpoint
CREATE TRIGGER memberships_auth_notify AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON memberships
  FOR EACH STATEMENT EXECUTE FUNCTION notify_auth_change();
--> statement-breakpoint
CREATE TRIGGER projects_auth_notify AFTER UPDATE OR DELETE OR TRUNCATE ON projects
  FOR EACH STATEMENT EXECUTE FUNCTION notify_auth_change();
