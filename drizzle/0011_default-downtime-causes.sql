-- Default downtime causes for every project that has none yet (they used to be created on the
-- first GET of the causes; now they come with the project). Same names, cutter-work flags and
-- sort order as DEFAULT_CAUSES in server/services/downtime.ts. Idempotent: a project with any
-- cause is left alone, and the unique (project_id, name) index guards a re-run.
INSERT INTO "downtime_causes" ("project_id", "name", "cutter_work", "sort_order")
SELECT p."id", d."name", d."cutter_work", d."sort_order"
FROM "projects" p
CROSS JOIN (VALUES
  ('Cutter inspection', true, 10),
  ('Cutter change', true, 20),
  ('Compressed-air stop', true, 30),
  ('Machine breakdown', false, 40),
  ('Lining supply', false, 50),
  ('Muck removal', false, 60),
  ('Survey', false, 70),
  ('Waiting', false, 80),
  ('Other', false, 90)
) AS d("name", "cutter_work", "sort_order")
WHERE NOT EXISTS (SELECT 1 FROM "downtime_causes" c WHERE c."project_id" = p."id")
ON CONFLICT DO NOTHING;
