-- Raises a drive's data version in the same transaction as any write to a forecast input, so no
-- write path can forget it (DEVELOPERS.md decision 38). Statement-level triggers with transition
-- tables: an import of 10,000 strokes raises the version once, not 10,000 times. A row whose
-- project is being deleted in the same statement is skipped (the join finds no project).
CREATE FUNCTION bump_drive_data_version() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO drive_data_versions AS v (project_id, version, changed_at)
  SELECT DISTINCT c.project_id, 1, now() FROM changed_rows c JOIN projects p ON p.id = c.project_id
  ON CONFLICT (project_id) DO UPDATE SET version = v.version + 1, changed_at = now();
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION bump_drive_data_version_of_project() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO drive_data_versions AS v (project_id, version, changed_at)
  SELECT DISTINCT c.id, 1, now() FROM changed_rows c JOIN projects p ON p.id = c.id
  ON CONFLICT (project_id) DO UPDATE SET version = v.version + 1, changed_at = now();
  RETURN NULL;
END $$;
--> statement-breakpoint
DO $$
DECLARE
  t text;
BEGIN
  FOREACH t IN ARRAY ARRAY['positions', 'cutters', 'fittings', 'inspection_rounds', 'inspection_entries', 'strokes',
                           'geology_sections', 'ground_types', 'forecast_settings'] LOOP
    EXECUTE format('CREATE TRIGGER %I AFTER INSERT ON %I REFERENCING NEW TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION bump_drive_data_version()', t || '_version_ins', t);
    EXECUTE format('CREATE TRIGGER %I AFTER UPDATE ON %I REFERENCING NEW TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION bump_drive_data_version()', t || '_version_upd', t);
    EXECUTE format('CREATE TRIGGER %I AFTER DELETE ON %I REFERENCING OLD TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION bump_drive_data_version()', t || '_version_del', t);
  END LOOP;
END $$;
--> statement-breakpoint
CREATE TRIGGER projects_version_upd AFTER UPDATE ON projects REFERENCING NEW TABLE AS changed_rows
  FOR EACH STATEMENT EXECUTE FUNCTION bump_drive_data_version_of_project();
