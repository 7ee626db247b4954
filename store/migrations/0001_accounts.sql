-- 0001_accounts: people, their sign-in secrets, teams and roles.
-- Times are UTC text 'YYYY-MM-DDTHH:MM:SS.ffffffZ' (fixed width, so they sort).
-- Secrets are never stored: only the SHA-256 of each token (BLOB, 32 bytes).

CREATE TABLE users (
    id            INTEGER PRIMARY KEY,
    email         TEXT    NOT NULL COLLATE NOCASE UNIQUE CHECK (length(email) BETWEEN 3 AND 254),
    name          TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
    password_hash TEXT    NOT NULL DEFAULT '', -- argon2id PHC string; '' = no password (link sign-in only)
    created_at    TEXT    NOT NULL,
    updated_at    TEXT    NOT NULL,
    version       INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1)
) STRICT;

CREATE TABLE sessions (
    id         INTEGER PRIMARY KEY,
    token_hash BLOB    NOT NULL UNIQUE CHECK (length(token_hash) = 32),
    user_id    INTEGER NOT NULL REFERENCES users (id) ON DELETE CASCADE,
    created_at TEXT    NOT NULL,
    expires_at TEXT    NOT NULL
) STRICT;
CREATE INDEX sessions_user ON sessions (user_id);

-- One-time sign-in links: the first-start console link, and links an
-- operator hands out. Redeeming one sets used_at.
CREATE TABLE signin_links (
    id         INTEGER PRIMARY KEY,
    token_hash BLOB    NOT NULL UNIQUE CHECK (length(token_hash) = 32),
    user_id    INTEGER NOT NULL REFERENCES users (id) ON DELETE CASCADE,
    created_at TEXT    NOT NULL,
    expires_at TEXT    NOT NULL,
    used_at    TEXT
) STRICT;

CREATE TABLE api_tokens (
    id           INTEGER PRIMARY KEY,
    user_id      INTEGER NOT NULL REFERENCES users (id) ON DELETE CASCADE,
    name         TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 100),
    token_hash   BLOB    NOT NULL UNIQUE CHECK (length(token_hash) = 32),
    created_at   TEXT    NOT NULL,
    expires_at   TEXT, -- NULL = until revoked
    last_used_at TEXT,
    revoked_at   TEXT
) STRICT;
CREATE INDEX api_tokens_user ON api_tokens (user_id);

CREATE TABLE teams (
    id         INTEGER PRIMARY KEY,
    name       TEXT    NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
    created_at TEXT    NOT NULL,
    updated_at TEXT    NOT NULL,
    version    INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1)
) STRICT;

CREATE TABLE memberships (
    team_id    INTEGER NOT NULL REFERENCES teams (id) ON DELETE CASCADE,
    user_id    INTEGER NOT NULL REFERENCES users (id) ON DELETE CASCADE,
    role       TEXT    NOT NULL CHECK (role IN ('owner', 'editor', 'viewer')),
    created_at TEXT    NOT NULL,
    updated_at TEXT    NOT NULL,
    version    INTEGER NOT NULL DEFAULT 1 CHECK (version >= 1),
    PRIMARY KEY (team_id, user_id)
) STRICT;
CREATE INDEX memberships_user ON memberships (user_id);

-- Team invitations by link: one-time, with the role the new member gets.
CREATE TABLE invitations (
    id          INTEGER PRIMARY KEY,
    team_id     INTEGER NOT NULL REFERENCES teams (id) ON DELETE CASCADE,
    token_hash  BLOB    NOT NULL UNIQUE CHECK (length(token_hash) = 32),
    role        TEXT    NOT NULL CHECK (role IN ('owner', 'editor', 'viewer')),
    note        TEXT    NOT NULL DEFAULT '',
    created_by  INTEGER REFERENCES users (id) ON DELETE SET NULL,
    created_at  TEXT    NOT NULL,
    expires_at  TEXT    NOT NULL,
    accepted_by INTEGER REFERENCES users (id) ON DELETE SET NULL,
    accepted_at TEXT,
    revoked_at  TEXT
) STRICT;
CREATE INDEX invitations_team ON invitations (team_id);
