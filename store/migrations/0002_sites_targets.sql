-- 0002_sites_targets: observatories, target lists, targets, their
-- ephemeris history and event timings.

CREATE TABLE sites (
    id               INTEGER PRIMARY KEY,
    team_id          INTEGER NOT NULL REFERENCES teams (id) ON DELETE CASCADE,
    name             TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
    lat_deg          REAL    NOT NULL CHECK (lat_deg BETWEEN -90 AND 90),
    lon_east_deg     REAL    NOT NULL CHECK (lon_east_deg BETWEEN -180 AND 180),
    elev_m           REAL    NOT NULL CHECK (elev_m BETWEEN -500 AND 9000),
    pressure_hpa     REAL    NOT NULL DEFAULT 0,
    temp_c           REAL    NOT NULL DEFAULT 0,
    zone             TEXT    NOT NULL,                                 -- IANA zone name
    horizon_json     TEXT    NOT NULL DEFAULT '[]' CHECK (json_valid(horizon_json)),
    constraints_json TEXT    NOT NULL DEFAULT '{}' CHECK (json_valid(constraints_json)),
    notes            TEXT    NOT NULL DEFAULT '',
    created_at       TEXT    NOT NULL,
    updated_at       TEXT    NOT NULL,
    version          INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1),
    UNIQUE (team_id, name)
) STRICT;

CREATE TABLE target_lists (
    id          INTEGER PRIMARY KEY,
    team_id     INTEGER NOT NULL REFERENCES teams (id) ON DELETE CASCADE,
    name        TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
    description TEXT    NOT NULL DEFAULT '',
    created_at  TEXT    NOT NULL,
    updated_at  TEXT    NOT NULL,
    version     INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1),
    UNIQUE (team_id, name)
) STRICT;

-- A target's orbital ephemeris is NOT here: it is the newest row of
-- ephemerides for the target.
CREATE TABLE targets (
    id           INTEGER PRIMARY KEY,
    list_id      INTEGER NOT NULL REFERENCES target_lists (id) ON DELETE CASCADE,
    name         TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
    ra_deg       REAL    NOT NULL CHECK (ra_deg >= 0 AND ra_deg < 360),
    dec_deg      REAL    NOT NULL CHECK (dec_deg BETWEEN -90 AND 90),
    pm_ra_masyr  REAL    NOT NULL DEFAULT 0,
    pm_dec_masyr REAL    NOT NULL DEFAULT 0,
    mag          REAL    NOT NULL DEFAULT 0, -- 0 = unknown, as in planner.Target
    priority     INTEGER NOT NULL CHECK (priority BETWEEN 1 AND 5),
    acquire_s    REAL    NOT NULL DEFAULT 0 CHECK (acquire_s >= 0),
    goals_json   TEXT    NOT NULL DEFAULT '[]' CHECK (json_valid(goals_json)),
    tags_json    TEXT    NOT NULL DEFAULT '[]' CHECK (json_valid(tags_json)),
    notes        TEXT    NOT NULL DEFAULT '',
    created_at   TEXT    NOT NULL,
    updated_at   TEXT    NOT NULL,
    version      INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1),
    UNIQUE (list_id, name)
) STRICT;

-- Ephemeris history: rows are only ever added. t0_day + t0_frac is T0 on
-- BJD_TDB (two-part Julian date); t0_in_* keep the epoch as it was given
-- (form, standard and text), so nothing typed is lost. Conversion to
-- BJD_TDB is geocentric (ephem.ConvertEpochGeocentric, within 21 ms).
CREATE TABLE ephemerides (
    id                    INTEGER PRIMARY KEY,
    target_id             INTEGER NOT NULL REFERENCES targets (id) ON DELETE CASCADE,
    t0_day                REAL    NOT NULL,
    t0_frac               REAL    NOT NULL CHECK (t0_frac >= 0 AND t0_frac < 1),
    t0_in_day             REAL    NOT NULL,
    t0_in_frac            REAL    NOT NULL,
    t0_in_form            TEXT    NOT NULL DEFAULT 'JD' CHECK (t0_in_form IN ('JD', 'MJD', 'RJD')),
    t0_in_standard        TEXT    NOT NULL CHECK (t0_in_standard IN ('JD_UTC', 'HJD_UTC', 'HJD_TT', 'BJD_UTC', 'BJD_TDB')),
    t0_in_text            TEXT    NOT NULL DEFAULT '',
    t0_err_days           REAL    NOT NULL DEFAULT 0 CHECK (t0_err_days >= 0),
    period_days           REAL    NOT NULL CHECK (period_days > 0),
    period_err_days       REAL    NOT NULL DEFAULT 0 CHECK (period_err_days >= 0),
    cov_t0_period         REAL    NOT NULL DEFAULT 0,
    pdot                  REAL    NOT NULL DEFAULT 0,
    pdot_err              REAL    NOT NULL DEFAULT 0 CHECK (pdot_err >= 0),
    cov_t0_pdot           REAL    NOT NULL DEFAULT 0,
    cov_p_pdot            REAL    NOT NULL DEFAULT 0,
    convention            TEXT    NOT NULL CHECK (convention IN ('inferior_conjunction', 'ascending_node', 'superior_conjunction', 'custom')),
    phase_offset          REAL    NOT NULL DEFAULT 0 CHECK (phase_offset >= 0 AND phase_offset < 1),
    ecc                   REAL    NOT NULL DEFAULT 0 CHECK (ecc >= 0 AND ecc < 1),
    omega_deg             REAL    NOT NULL DEFAULT 0,
    source                TEXT    NOT NULL CHECK (source IN ('entered', 'import', 'fit', 'demo')),
    fit_json              TEXT    NOT NULL DEFAULT '{}' CHECK (json_valid(fit_json)),
    note                  TEXT    NOT NULL DEFAULT '',
    created_by            INTEGER REFERENCES users (id) ON DELETE SET NULL,
    created_at            TEXT    NOT NULL
) STRICT;
CREATE INDEX ephemerides_target ON ephemerides (target_id, id);

-- Measured times of an orbital event, for refining the ephemeris.
CREATE TABLE timings (
    id          INTEGER PRIMARY KEY,
    target_id   INTEGER NOT NULL REFERENCES targets (id) ON DELETE CASCADE,
    event       TEXT    NOT NULL,
    t_day       REAL    NOT NULL,                 -- BJD_TDB, two parts
    t_frac      REAL    NOT NULL CHECK (t_frac >= 0 AND t_frac < 1),
    t_in_day    REAL    NOT NULL,                 -- as given
    t_in_frac   REAL    NOT NULL,
    t_in_form   TEXT    NOT NULL DEFAULT 'JD' CHECK (t_in_form IN ('JD', 'MJD', 'RJD')),
    t_in_standard TEXT  NOT NULL CHECK (t_in_standard IN ('JD_UTC', 'HJD_UTC', 'HJD_TT', 'BJD_UTC', 'BJD_TDB')),
    t_in_text   TEXT    NOT NULL DEFAULT '',
    err_days    REAL    NOT NULL CHECK (err_days > 0),
    observer    TEXT    NOT NULL DEFAULT '',
    note        TEXT    NOT NULL DEFAULT '',
    created_by  INTEGER REFERENCES users (id) ON DELETE SET NULL,
    created_at  TEXT    NOT NULL,
    updated_at  TEXT    NOT NULL,
    version     INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1)
) STRICT;
CREATE INDEX timings_target ON timings (target_id, t_day, t_frac);
