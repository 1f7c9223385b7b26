-- 0003: the centre's enclosures (cages, aviaries, flight cages, pools), with
-- their inside size in metres. Housing records copy an enclosure's name,
-- kind and size when a patient moves in, so a later change of an enclosure
-- does not rewrite a patient's history. Enclosures are retired, never deleted.
CREATE TABLE enclosures (
    id         INTEGER PRIMARY KEY,
    name       TEXT    NOT NULL UNIQUE COLLATE NOCASE,
    kind       TEXT    NOT NULL CHECK (kind IN ('indoor-cage','outdoor-aviary','flight-cage','pool')),
    length_m   REAL    NOT NULL CHECK (length_m > 0),
    width_m    REAL    NOT NULL CHECK (width_m > 0),
    height_m   REAL    NOT NULL CHECK (height_m > 0),
    notes      TEXT    NOT NULL DEFAULT '',
    retired    INTEGER NOT NULL DEFAULT 0,
    created_by INTEGER REFERENCES users(id),
    created_at TEXT    NOT NULL,
    updated_at TEXT    NOT NULL,
    version    INTEGER NOT NULL DEFAULT 1
);
