-- 0007: the centre's own settings: threshold values, species reference
-- overrides and additions, and named release sites.
--
-- threshold_settings and species_overrides hold only the values in force;
-- every change (and every reset, which removes a row) leaves an audit row
-- with the value before and after, so the history lives in audit_log.

-- One row per threshold (and species group, for a threshold set per group)
-- that the centre has changed from Aloft's default. species_group is ''
-- for a threshold that does not depend on the group.
CREATE TABLE threshold_settings (
    id            INTEGER PRIMARY KEY,
    threshold_id  TEXT    NOT NULL,
    species_group TEXT    NOT NULL DEFAULT '',
    value         REAL    NOT NULL,
    note          TEXT    NOT NULL DEFAULT '',
    set_by        INTEGER REFERENCES users(id),
    set_at        TEXT    NOT NULL,             -- RFC 3339, UTC
    UNIQUE (threshold_id, species_group)
);

-- One row per reference value the centre has set for a species: an
-- override of a shipped species' value, or a value of a species the centre
-- added (a species whose scientific name is not in the shipped table).
-- field is the value's name in the species reference ("span_mm",
-- "mass_g.female", "mass_range_g.unknown", "launch_mode", …); value_json
-- its value as JSON (a number, a string, a boolean, or [min, max] for a
-- range).
CREATE TABLE species_overrides (
    id          INTEGER PRIMARY KEY,
    species     TEXT    NOT NULL COLLATE NOCASE,  -- scientific name
    field       TEXT    NOT NULL,
    value_json  TEXT    NOT NULL,
    note        TEXT    NOT NULL DEFAULT '',
    set_by      INTEGER REFERENCES users(id),
    set_at      TEXT    NOT NULL,                 -- RFC 3339, UTC
    UNIQUE (species, field)
);
CREATE INDEX species_overrides_species ON species_overrides(species);

-- Named release sites: where birds go back, with the elevation the flight
-- model reads. Sites are retired, never deleted: reports name them.
CREATE TABLE release_sites (
    id          INTEGER PRIMARY KEY,
    name        TEXT    NOT NULL UNIQUE COLLATE NOCASE,
    elevation_m REAL    NOT NULL CHECK (elevation_m >= -500 AND elevation_m <= 5000),
    notes       TEXT    NOT NULL DEFAULT '',
    retired     INTEGER NOT NULL DEFAULT 0,
    created_by  INTEGER REFERENCES users(id),
    created_at  TEXT    NOT NULL,
    updated_at  TEXT    NOT NULL,
    version     INTEGER NOT NULL DEFAULT 1
);
