-- 0004_audit: every change, written in the transaction that makes it.
-- No foreign keys: the log outlives what it describes.
CREATE TABLE audit_log (
    id          INTEGER PRIMARY KEY,
    at          TEXT    NOT NULL,
    team_id     INTEGER,          -- NULL for account-level changes
    user_id     INTEGER,          -- NULL for the system (seeding, console)
    actor       TEXT    NOT NULL, -- who, as shown: "Ada Q. <ada@…> via session", "system"
    entity      TEXT    NOT NULL,
    entity_id   INTEGER NOT NULL,
    action      TEXT    NOT NULL CHECK (action IN ('create', 'update', 'delete')),
    before_json TEXT    CHECK (before_json IS NULL OR json_valid(before_json)),
    after_json  TEXT    CHECK (after_json IS NULL OR json_valid(after_json))
) STRICT;
CREATE INDEX audit_team ON audit_log (team_id, id);
CREATE INDEX audit_entity ON audit_log (entity, entity_id, id);
