-- 0007_site_telescope: a site may describe its telescope's motion (PostgreSQL twin)
-- (planner.TelescopeJSON); '' is none, and the planner then charges each
-- visit the fixed acquisition time.

ALTER TABLE sites ADD COLUMN telescope_json TEXT NOT NULL DEFAULT ''
    CHECK (telescope_json = '' OR json_valid(telescope_json));
