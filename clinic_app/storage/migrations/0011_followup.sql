-- After the first assessment: reassessments (a chain per case), bedside monitoring entries,
-- outcomes and follow-up visits. Ids are made on the device; a re-send with the same payload is
-- a duplicate, with a different payload a conflict kept in followup_conflicts.
CREATE TABLE reassessments (
    id               TEXT PRIMARY KEY,
    case_id          TEXT NOT NULL REFERENCES cases(id),
    previous_id      TEXT REFERENCES reassessments(id),  -- NULL: follows the case's first assessment
    assessed_at      TEXT NOT NULL,             -- device clock, ISO 8601
    received_at      TEXT NOT NULL,             -- server clock
    user_id          INTEGER NOT NULL REFERENCES users(id),
    device_id        TEXT REFERENCES devices(id),
    input            TEXT NOT NULL,             -- JSON: the assess input of the new signs
    result           TEXT NOT NULL,             -- JSON: result computed on the phone (or server)
    server_result    TEXT NOT NULL,             -- JSON: result recomputed by the server
    engine_mismatch  INTEGER NOT NULL DEFAULT 0,
    payload_hash     TEXT NOT NULL,
    severity         TEXT NOT NULL,
    plan             TEXT NOT NULL,
    transition       TEXT NOT NULL,             -- e.g. B_to_A, B_repeat
    send_for_iv      INTEGER NOT NULL DEFAULT 0
);
CREATE INDEX reassessments_case ON reassessments(case_id, assessed_at);

CREATE TABLE monitoring_entries (
    id            TEXT PRIMARY KEY,
    case_id       TEXT NOT NULL REFERENCES cases(id),
    at            TEXT NOT NULL,                -- device clock, when it happened
    received_at   TEXT NOT NULL,
    user_id       INTEGER NOT NULL REFERENCES users(id),
    device_id     TEXT REFERENCES devices(id),
    kind          TEXT NOT NULL CHECK (kind IN ('intake', 'output', 'check')),
    what          TEXT NOT NULL CHECK (what IN ('ors', 'other', 'stool', 'vomit', 'urine', 'check')),
    ml            INTEGER,
    cups          REAL,
    puffy_eyelids INTEGER NOT NULL DEFAULT 0,
    not_improving INTEGER NOT NULL DEFAULT 0,
    payload_hash  TEXT NOT NULL
);
CREATE INDEX monitoring_case ON monitoring_entries(case_id, at);

CREATE TABLE outcomes (
    id            TEXT PRIMARY KEY,
    case_id       TEXT NOT NULL REFERENCES cases(id),
    outcome       TEXT NOT NULL CHECK (outcome IN
                  ('recovered_home', 'referred', 'admitted', 'died', 'lost_to_follow_up')),
    at            TEXT NOT NULL,                -- device clock
    received_at   TEXT NOT NULL,
    user_id       INTEGER NOT NULL REFERENCES users(id),
    device_id     TEXT REFERENCES devices(id),
    referred_to   TEXT,
    referred_at   TEXT,
    transport     TEXT,
    followup_date TEXT,                         -- YYYY-MM-DD, NULL when none is needed
    payload_hash  TEXT NOT NULL
);
CREATE INDEX outcomes_case ON outcomes(case_id, at);

CREATE TABLE followup_visits (
    id          INTEGER PRIMARY KEY,
    case_id     TEXT NOT NULL REFERENCES cases(id),
    outcome_id  TEXT REFERENCES outcomes(id),
    due_date    TEXT NOT NULL,                  -- YYYY-MM-DD
    reason      TEXT NOT NULL DEFAULT '',       -- classification code
    status      TEXT NOT NULL DEFAULT 'due' CHECK (status IN ('due', 'done', 'cancelled')),
    done_at     TEXT,
    done_by     INTEGER REFERENCES users(id),
    UNIQUE (outcome_id)
);
CREATE INDEX followup_visits_due ON followup_visits(status, due_date);

CREATE TABLE followup_conflicts (
    id           INTEGER PRIMARY KEY,
    kind         TEXT NOT NULL,                 -- reassessment | monitoring | outcome
    record_id    TEXT NOT NULL,
    received_at  TEXT NOT NULL,
    user_id      INTEGER NOT NULL REFERENCES users(id),
    device_id    TEXT REFERENCES devices(id),
    payload      TEXT NOT NULL,
    payload_hash TEXT NOT NULL,
    UNIQUE (kind, record_id, payload_hash)
);

CREATE INDEX cases_outcome ON cases(outcome);
