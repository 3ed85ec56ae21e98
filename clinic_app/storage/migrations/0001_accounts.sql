-- Accounts, revocable server-side sessions, login throttling, devices, clinic settings, audit log.
CREATE TABLE users (
    id            INTEGER PRIMARY KEY,
    username      TEXT NOT NULL UNIQUE COLLATE NOCASE,
    display_name  TEXT NOT NULL DEFAULT '',
    role          TEXT NOT NULL CHECK (role IN ('chw', 'nurse', 'supervisor', 'admin')),
    area          TEXT NOT NULL DEFAULT '',
    password_hash TEXT NOT NULL,
    must_change_password INTEGER NOT NULL DEFAULT 0,
    active        INTEGER NOT NULL DEFAULT 1,
    created_at    TEXT NOT NULL
);

CREATE TABLE sessions (
    id          TEXT PRIMARY KEY,          -- sha256 of the token kept in the signed cookie
    user_id     INTEGER NOT NULL REFERENCES users(id) ON DELETE CASCADE,
    created_at  TEXT NOT NULL,
    expires_at  TEXT NOT NULL,
    address     TEXT NOT NULL DEFAULT ''
);
CREATE INDEX sessions_user ON sessions(user_id);

CREATE TABLE login_failures (
    id       INTEGER PRIMARY KEY,
    username TEXT NOT NULL COLLATE NOCASE,
    address  TEXT NOT NULL,
    at       REAL NOT NULL                -- unix seconds
);
CREATE INDEX login_failures_user ON login_failures(username, at);
CREATE INDEX login_failures_addr ON login_failures(address, at);

CREATE TABLE devices (
    id          TEXT PRIMARY KEY,
    user_id     INTEGER NOT NULL REFERENCES users(id),
    token_hash  TEXT NOT NULL UNIQUE,
    label       TEXT NOT NULL DEFAULT '',
    created_at  TEXT NOT NULL,
    last_seen_at TEXT,
    revoked_at  TEXT
);
CREATE INDEX devices_user ON devices(user_id);

CREATE TABLE settings_versions (
    id          INTEGER PRIMARY KEY,
    data        TEXT NOT NULL,             -- JSON of ClinicSettings fields
    changed_by  INTEGER REFERENCES users(id),
    changed_at  TEXT NOT NULL
);

CREATE TABLE audit_log (
    id          INTEGER PRIMARY KEY,
    at          TEXT NOT NULL,
    user_id     INTEGER,
    device_id   TEXT,
    action      TEXT NOT NULL,
    record_type TEXT NOT NULL,
    record_id   TEXT NOT NULL,
    prev_hash   TEXT NOT NULL,
    hash        TEXT NOT NULL
);
CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log
BEGIN SELECT RAISE(ABORT, 'audit_log is append-only'); END;
CREATE TRIGGER audit_log_no_delete BEFORE DELETE ON audit_log
BEGIN SELECT RAISE(ABORT, 'audit_log is append-only'); END;
