-- 0004: dispositions — what became of each patient (released, renested,
-- transferred, died, euthanised, dead on arrival, escaped), with its date,
-- place and who carried it out. Versioned like entries: a correction inserts
-- a new version with the same disposition_key and marks the old one
-- superseded. There is no delete path. patients.status and status_date mirror
-- the current version, written in the same transaction.
CREATE TABLE dispositions (
    id                INTEGER PRIMARY KEY,
    disposition_key   INTEGER NOT NULL,              -- stable across versions: the first version's id
    patient_id        INTEGER NOT NULL REFERENCES patients(id),
    version           INTEGER NOT NULL,
    kind              TEXT    NOT NULL CHECK (kind IN ('released','renested','transferred','died',
                                                       'euthanised','dead-on-arrival','escaped')),
    disposed_on       TEXT    NOT NULL,              -- YYYY-MM-DD
    place             TEXT    NOT NULL DEFAULT '',
    lat               REAL CHECK (lat IS NULL OR (lat BETWEEN -90 AND 90)),   -- decimal degrees, WGS 84
    lon               REAL CHECK (lon IS NULL OR (lon BETWEEN -180 AND 180)),
    receiver          TEXT    NOT NULL DEFAULT '',   -- transferred: who received the bird
    reason            TEXT    NOT NULL DEFAULT '',   -- died: cause; euthanised: reason; others: note
    report_version_id INTEGER,                       -- released: the signed pre-release report version
    no_report_reason  TEXT    NOT NULL DEFAULT '',   -- released without a signed report: why none was needed
    performed_by      TEXT    NOT NULL DEFAULT '',   -- the person who carried it out
    note              TEXT    NOT NULL DEFAULT '',   -- a correction's reason
    created_by        INTEGER REFERENCES users(id),  -- who recorded this version
    created_at        TEXT    NOT NULL,
    superseded        INTEGER NOT NULL DEFAULT 0,
    UNIQUE (disposition_key, version)
);
-- One current disposition per patient.
CREATE UNIQUE INDEX dispositions_current ON dispositions(patient_id) WHERE superseded = 0;
CREATE INDEX dispositions_key ON dispositions(disposition_key);
CREATE INDEX dispositions_date ON dispositions(disposed_on) WHERE superseded = 0;
