-- The clinic's non-clinical settings (name, stock alert, languages), versioned like the
-- clinical settings: every save is a new row, the newest one is in force.
CREATE TABLE clinic_profile_versions (
    id          INTEGER PRIMARY KEY,
    data        TEXT NOT NULL,             -- JSON of ClinicProfile fields
    changed_by  INTEGER REFERENCES users(id),
    changed_at  TEXT NOT NULL
);
