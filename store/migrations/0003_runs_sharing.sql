-- 0003_runs_sharing: observing runs, their saved plans, what was observed,
-- and read-only share links.

-- site_id and list_id use the default NO ACTION: a site or list that a run
-- uses cannot be deleted on its own, yet deleting the team removes all.
CREATE TABLE runs (
    id               INTEGER PRIMARY KEY,
    team_id          INTEGER NOT NULL REFERENCES teams (id) ON DELETE CASCADE,
    name             TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
    site_id          INTEGER NOT NULL REFERENCES sites (id),
    list_id          INTEGER NOT NULL REFERENCES target_lists (id),
    nights_json      TEXT    NOT NULL CHECK (json_valid(nights_json)),
    constraints_json TEXT    NOT NULL DEFAULT '{}' CHECK (json_valid(constraints_json)),
    notes            TEXT    NOT NULL DEFAULT '',
    created_at       TEXT    NOT NULL,
    updated_at       TEXT    NOT NULL,
    version          INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1),
    UNIQUE (team_id, name)
) STRICT;
CREATE INDEX runs_site ON runs (site_id);
CREATE INDEX runs_list ON runs (list_id);

-- A plan is kept as made: inputs, output and the engine that made it.
CREATE TABLE saved_plans (
    id             INTEGER PRIMARY KEY,
    run_id         INTEGER NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    name           TEXT    NOT NULL DEFAULT '',
    engine_version TEXT    NOT NULL CHECK (length(engine_version) >= 1),
    inputs_json    TEXT    NOT NULL CHECK (json_valid(inputs_json)),
    output_json    TEXT    NOT NULL CHECK (json_valid(output_json)),
    created_by     INTEGER REFERENCES users (id) ON DELETE SET NULL,
    created_at     TEXT    NOT NULL
) STRICT;
CREATE INDEX saved_plans_run ON saved_plans (run_id, id);

-- Exposures actually taken (or lost), per target.
CREATE TABLE observations (
    id          INTEGER PRIMARY KEY,
    target_id   INTEGER NOT NULL REFERENCES targets (id) ON DELETE CASCADE,
    run_id      INTEGER REFERENCES runs (id) ON DELETE SET NULL,
    mid_utc     TEXT    NOT NULL,
    exposure_s  REAL    NOT NULL CHECK (exposure_s >= 0),
    status      TEXT    NOT NULL CHECK (status IN ('done', 'failed')),
    source      TEXT    NOT NULL CHECK (source IN ('log', 'block', 'manual', 'demo')),
    goal_center REAL CHECK (goal_center IS NULL OR (goal_center >= 0 AND goal_center < 1)),
    note        TEXT    NOT NULL DEFAULT '',
    created_by  INTEGER REFERENCES users (id) ON DELETE SET NULL,
    created_at  TEXT    NOT NULL,
    updated_at  TEXT    NOT NULL,
    version     INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1)
) STRICT;
CREATE INDEX observations_target ON observations (target_id, mid_utc);
CREATE INDEX observations_run ON observations (run_id);

-- Read-only links to exactly one list or one run.
CREATE TABLE share_links (
    id         INTEGER PRIMARY KEY,
    team_id    INTEGER NOT NULL REFERENCES teams (id) ON DELETE CASCADE,
    token_hash BLOB    NOT NULL UNIQUE CHECK (length(token_hash) = 32),
    list_id    INTEGER REFERENCES target_lists (id) ON DELETE CASCADE,
    run_id     INTEGER REFERENCES runs (id) ON DELETE CASCADE,
    label      TEXT    NOT NULL DEFAULT '',
    created_by INTEGER REFERENCES users (id) ON DELETE SET NULL,
    created_at TEXT    NOT NULL,
    expires_at TEXT    NOT NULL,
    revoked_at TEXT,
    CHECK ((list_id IS NULL) <> (run_id IS NULL))
) STRICT;
CREATE INDEX share_links_team ON share_links (team_id);
CREATE INDEX share_links_list ON share_links (list_id);
CREATE INDEX share_links_run ON share_links (run_id);
