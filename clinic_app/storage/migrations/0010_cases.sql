-- Cases recorded on phones (or the server form) and synced exactly once; conflicts kept apart.
CREATE TABLE cases (
    id                 TEXT PRIMARY KEY,          -- UUID made on the device
    created_at         TEXT NOT NULL,             -- device clock, ISO 8601
    received_at        TEXT NOT NULL,             -- server clock
    user_id            INTEGER NOT NULL REFERENCES users(id),
    device_id          TEXT REFERENCES devices(id),
    area               TEXT NOT NULL DEFAULT '',
    input              TEXT NOT NULL,             -- JSON: the assess input
    result             TEXT NOT NULL,             -- JSON: the result computed on the phone
    server_result      TEXT NOT NULL,             -- JSON: the result recomputed by the server
    engine_mismatch    INTEGER NOT NULL DEFAULT 0,
    payload_hash       TEXT NOT NULL,             -- sha256 of the canonical JSON payload
    rulebook_version   TEXT NOT NULL DEFAULT '',
    ors_sachets        INTEGER NOT NULL DEFAULT 0,
    zinc_tablets       INTEGER NOT NULL DEFAULT 0,
    referral_made      INTEGER NOT NULL DEFAULT 0,
    caregiver_language TEXT NOT NULL DEFAULT '',
    household_ref      TEXT,
    note               TEXT,
    status             TEXT NOT NULL DEFAULT 'active' CHECK (status IN ('active', 'quarantined')),
    -- Denormalised from server_result / input for the supervisor's tallies.
    severity           TEXT NOT NULL,
    plan               TEXT NOT NULL,
    refer              TEXT NOT NULL,
    classifications    TEXT NOT NULL DEFAULT '[]',  -- JSON list of codes
    danger_sign        INTEGER NOT NULL DEFAULT 0,
    age_months         REAL NOT NULL,
    sex                TEXT,
    suspected_cholera  INTEGER NOT NULL DEFAULT 0,
    outcome            TEXT                       -- set by issue 6
);
CREATE INDEX cases_user_created ON cases(user_id, created_at);
CREATE INDEX cases_created ON cases(created_at);
CREATE INDEX cases_area_created ON cases(area, created_at);
CREATE INDEX cases_severity ON cases(severity, created_at);
CREATE INDEX cases_status ON cases(status);

-- The same case id sent again with a different payload: kept for review, never merged.
CREATE TABLE case_conflicts (
    id           INTEGER PRIMARY KEY,
    case_id      TEXT NOT NULL,
    received_at  TEXT NOT NULL,
    user_id      INTEGER NOT NULL REFERENCES users(id),
    device_id    TEXT REFERENCES devices(id),
    payload      TEXT NOT NULL,
    payload_hash TEXT NOT NULL,
    resolved_at  TEXT,
    UNIQUE (case_id, payload_hash)
);
CREATE INDEX case_conflicts_case ON case_conflicts(case_id);
