-- 0006: frozen pre-release report versions and their sign-offs.
-- Generating a report for review stores its exact bytes and their SHA-256:
-- a version never changes, whatever happens to the patient's records later.
-- The veterinarian and the licensed rehabilitator sign off on that hash. The
-- application only inserts into these tables; the triggers below make the
-- database refuse any update or delete as well.
CREATE TABLE report_versions (
    id          INTEGER PRIMARY KEY,
    patient_id  INTEGER NOT NULL REFERENCES patients(id),
    version     INTEGER NOT NULL CHECK (version >= 1),   -- 1, 2, … per patient
    created_at  TEXT    NOT NULL,                        -- RFC 3339, UTC
    created_by  INTEGER REFERENCES users(id),
    sha256      TEXT    NOT NULL CHECK (length(sha256) = 64),  -- lower-case hex of pdf
    pdf         BLOB    NOT NULL,
    site_json   TEXT    NOT NULL,                        -- the release site assessed, with its label
    page_size   TEXT    NOT NULL CHECK (page_size IN ('A4','Letter')),
    UNIQUE (patient_id, version)
);
CREATE INDEX report_versions_patient ON report_versions(patient_id, version);

CREATE TABLE signoffs (
    id                INTEGER PRIMARY KEY,
    report_version_id INTEGER NOT NULL REFERENCES report_versions(id),
    user_id           INTEGER NOT NULL REFERENCES users(id),
    role              TEXT    NOT NULL CHECK (role IN ('vet','rehabilitator')),
    at                TEXT    NOT NULL,                  -- RFC 3339, UTC
    comment           TEXT    NOT NULL DEFAULT '',
    sha256            TEXT    NOT NULL CHECK (length(sha256) = 64),  -- the hash signed
    UNIQUE (report_version_id, user_id, role)
);
CREATE INDEX signoffs_version ON signoffs(report_version_id);

CREATE TRIGGER report_versions_no_update BEFORE UPDATE ON report_versions
BEGIN SELECT RAISE(ABORT, 'report_versions are frozen'); END;
CREATE TRIGGER report_versions_no_delete BEFORE DELETE ON report_versions
BEGIN SELECT RAISE(ABORT, 'report_versions are frozen'); END;
CREATE TRIGGER signoffs_no_update BEFORE UPDATE ON signoffs
BEGIN SELECT RAISE(ABORT, 'signoffs are append-only'); END;
CREATE TRIGGER signoffs_no_delete BEFORE DELETE ON signoffs
BEGIN SELECT RAISE(ABORT, 'signoffs are append-only'); END;
