-- 0006_brightness_instruments: a target's brightness for exposures sized
-- by signal-to-noise (band, and a variable's faint and bright magnitudes
-- at their phases; mag is already a column), and the instruments of a
-- site (a JSON array of planner.Instrument, in the order given; the
-- first is the default). Goals' snr and max_smear live in goals_json.

ALTER TABLE targets ADD COLUMN band TEXT NOT NULL DEFAULT ''
    CHECK (band IN ('', 'U', 'B', 'V', 'R', 'I', 'g', 'r', 'i', 'z'));
ALTER TABLE targets ADD COLUMN faint_mag REAL NOT NULL DEFAULT 0;   -- 0 with bright_mag 0: not a variable
ALTER TABLE targets ADD COLUMN faint_phase REAL NOT NULL DEFAULT 0
    CHECK (faint_phase >= 0 AND faint_phase < 1);
ALTER TABLE targets ADD COLUMN bright_mag REAL NOT NULL DEFAULT 0;
ALTER TABLE targets ADD COLUMN bright_phase REAL NOT NULL DEFAULT 0
    CHECK (bright_phase >= 0 AND bright_phase < 1);

ALTER TABLE sites ADD COLUMN instruments_json TEXT NOT NULL DEFAULT '[]'
    CHECK (json_valid(instruments_json));
