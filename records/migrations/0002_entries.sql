-- 0002: patient records of every kind (weigh-ins, scores, wings, trials,
-- sessions, clinical records …) as versioned JSON documents of the engine's
-- input types. A correction inserts a new version with the same entry_key and
-- marks the old one superseded; a removal is a soft delete with a reason.
CREATE TABLE entries (
    id              INTEGER PRIMARY KEY,
    entry_key       INTEGER NOT NULL,              -- stable across versions: the first version's id
    patient_id      INTEGER NOT NULL REFERENCES patients(id),
    kind            TEXT    NOT NULL,
    version         INTEGER NOT NULL,
    at              TEXT    NOT NULL,              -- when observed (RFC 3339, UTC)
    data_json       TEXT    NOT NULL,
    created_by      INTEGER REFERENCES users(id),
    created_at      TEXT    NOT NULL,
    superseded      INTEGER NOT NULL DEFAULT 0,
    removed_at      TEXT,
    removed_by      INTEGER REFERENCES users(id),
    removed_reason  TEXT,
    idempotency_key TEXT UNIQUE,
    UNIQUE (entry_key, version)
);
CREATE INDEX entries_patient_kind ON entries(patient_id, kind, superseded, at);
CREATE INDEX entries_key ON entries(entry_key);
