-- 0001: the centre, users, login sessions, patients and the audit trail.
CREATE TABLE centre (
    id           INTEGER PRIMARY KEY CHECK (id = 1),
    name         TEXT    NOT NULL,
    address      TEXT    NOT NULL DEFAULT '',
    elevation_m  REAL    NOT NULL DEFAULT 0,
    is_demo      INTEGER NOT NULL DEFAULT 0,
    updated_at   TEXT    NOT NULL
);

CREATE TABLE users (
    id            INTEGER PRIMARY KEY,
    username      TEXT    NOT NULL UNIQUE COLLATE NOCASE,
    display_name  TEXT    NOT NULL,
    password_hash TEXT    NOT NULL,
    disabled      INTEGER NOT NULL DEFAULT 0,
    created_at    TEXT    NOT NULL
);

CREATE TABLE user_roles (
    user_id INTEGER NOT NULL REFERENCES users(id),
    role    TEXT    NOT NULL CHECK (role IN ('staff','rehabilitator','vet','admin')),
    PRIMARY KEY (user_id, role)
);

CREATE TABLE login_sessions (
    token_hash  TEXT    PRIMARY KEY,
    user_id     INTEGER NOT NULL REFERENCES users(id),
    csrf_token  TEXT    NOT NULL,
    created_at  TEXT    NOT NULL,
    expires_at  TEXT    NOT NULL
);
CREATE INDEX login_sessions_user ON login_sessions(user_id);

CREATE TABLE patients (
    id                 INTEGER PRIMARY KEY,
    case_number        TEXT    NOT NULL UNIQUE,
    case_year          INTEGER NOT NULL,
    case_seq           INTEGER NOT NULL,
    species_scientific TEXT    NOT NULL,
    species_common     TEXT    NOT NULL DEFAULT '',
    age_class          TEXT    NOT NULL,
    sex                TEXT    NOT NULL CHECK (sex IN ('female','male','unknown')),
    found_date         TEXT    NOT NULL,
    found_place        TEXT    NOT NULL DEFAULT '',
    found_lat          REAL,
    found_lon          REAL,
    finder_name        TEXT    NOT NULL DEFAULT '',
    finder_contact     TEXT    NOT NULL DEFAULT '',
    reason             TEXT    NOT NULL,
    intake_condition   TEXT    NOT NULL DEFAULT '',
    intake_mass_g      REAL    NOT NULL CHECK (intake_mass_g > 0),
    mass_note          TEXT    NOT NULL DEFAULT '',
    admitted_at        TEXT    NOT NULL,
    status             TEXT    NOT NULL DEFAULT 'in-care',
    status_date        TEXT,
    created_by         INTEGER REFERENCES users(id),
    updated_at         TEXT    NOT NULL,
    version            INTEGER NOT NULL DEFAULT 1,
    UNIQUE (case_year, case_seq)
);
CREATE INDEX patients_status ON patients(status, admitted_at);
CREATE INDEX patients_species ON patients(species_scientific);

CREATE TABLE audit_log (
    id          INTEGER PRIMARY KEY,
    at          TEXT    NOT NULL,
    user_id     INTEGER REFERENCES users(id),
    entity      TEXT    NOT NULL,
    entity_id   INTEGER NOT NULL,
    patient_id  INTEGER,
    action      TEXT    NOT NULL,
    before_json TEXT,
    after_json  TEXT
);
CREATE INDEX audit_entity ON audit_log(entity, entity_id);
CREATE INDEX audit_patient ON audit_log(patient_id);

-- The application never updates or deletes audit rows; these triggers make
-- the database refuse it too. Redaction (of finders' personal data) is the
-- one exception and goes through the redaction path, which drops and
-- re-creates nothing: it is allowed only while redaction_in_progress is set.
CREATE TABLE redaction_guard (active INTEGER NOT NULL DEFAULT 0);
INSERT INTO redaction_guard (active) VALUES (0);
CREATE TRIGGER audit_no_update BEFORE UPDATE ON audit_log
WHEN (SELECT active FROM redaction_guard) = 0
BEGIN SELECT RAISE(ABORT, 'audit_log is append-only'); END;
CREATE TRIGGER audit_no_delete BEFORE DELETE ON audit_log
BEGIN SELECT RAISE(ABORT, 'audit_log is append-only'); END;
