package assess

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"
)

// A case file is one patient's complete record as one JSON document: the
// patient, the species reference used (embedded whole, so the file assesses
// the same later even if the species table changes), every current record
// Evaluate reads, and optionally a release site. `aloft assess --input`
// reads it, the per-patient export writes it, and the engine's scenario
// tests are written in it.
//
// Format version 1 (format_version is required and must be 1):
//
//	{
//	  "format_version": 1,
//	  "patient": {
//	    "case_number": "2025-0042",          required, at most 64 characters
//	    "species_scientific": "Pandion haliaetus",   = species.scientific_name
//	    "species_common": "Osprey",
//	    "age_class": "adult",                hatchling, nestling, fledgling, juvenile,
//	                                         immature, adult, unknown (or "")
//	    "sex": "female",                     female, male, unknown
//	    "admitted_at": "2025-05-01T09:30:00Z",   RFC 3339, required
//	    "found_date": "2025-04-30",          YYYY-MM-DD or ""
//	    "found_place": "…", "found_lat": 51.2, "found_lon": -1.1,   optional, WGS 84
//	    "finder_name": "…", "finder_contact": "…",   personal data: omitted unless asked for
//	    "reason": "…", "intake_condition": "…", "intake_mass_g": 1390,
//	    "status": "in-care",                 a disposition (in-care while none applies)
//	    "status_date": ""                    YYYY-MM-DD of the disposition
//	  },
//	  "species": { … },                      one row of the species reference, as
//	                                         `aloft species show NAME --json` prints it
//	  "inputs": {                            CaseInputs: the records, each dated "at"
//	    "sex": "female", "age_class": "adult", "admitted_at": "…",   as the patient's
//	    "weigh_ins": [ {"at", "mass_g", "fed", "note"} ],
//	    "conditions": [ {"at", "fat_score", "fat_scale", "muscle_score", "body_condition"} ],
//	    "wings": [ {"at", "span_mm", "area_cm2", "area_method", "chord_mm", "feathers", "note"} ],
//	    "trials": [ {"at", "mode", "mode_reason", "surface", "run_up_m", "drop_height_m",
//	                 "wind", "wind_dir", "attempts", "notes"} ],
//	    "sessions": [ {"at", "exercise", "enclosure_name", "enclosure_length_m", "air_temp_c",
//	                   "duration_s", "passes", "longest_run", "highest", "landings",
//	                   "landings_controlled", "recovery_s", "open_mouth", "tail_bobbing",
//	                   "droop", "asymmetry", "wingbeat_hz", "group", "group_size",
//	                   "per_bird", "group_cases", "notes"} ],
//	    "waterproofing": [ {"at", "minutes_on_water", "wet_to_skin", "result"} ],
//	    "housing": [ {"from", "enclosure_name", "kind", "length_m", "width_m", "height_m",
//	                  "prerelease"} ],
//	    "clearances": [ {"item", "state", "by", "role", "at", "note"} ]
//	  },
//	  "site": {"elevation_m": 120, "temp_c": 18, "name": "…"}   optional release site
//	}
//
// Units are those staff record (g, mm, cm², m, s, °C); the vocabularies are
// those of package assess (case.go, vocab.go). Empty "sex", "age_class" and
// "admitted_at" in inputs are taken from the patient; set, they must agree
// with it. Unknown keys are refused, so a misspelt key is never silently
// ignored. A later format adds keys under a new format_version.
type CaseFile struct {
	FormatVersion int         `json:"format_version"`
	Patient       CasePatient `json:"patient"`
	Species       Species     `json:"species"`
	Inputs        CaseInputs  `json:"inputs"`
	Site          *CaseSite   `json:"site,omitempty"`
}

// CaseFileVersion is the case-file format version this package reads and
// writes.
const CaseFileVersion = 1

// CasePatient is the patient part of a case file: the intake details and
// the disposition.
type CasePatient struct {
	CaseNumber        string    `json:"case_number"`
	SpeciesScientific string    `json:"species_scientific"`
	SpeciesCommon     string    `json:"species_common"`
	AgeClass          string    `json:"age_class"`
	Sex               Sex       `json:"sex"`
	AdmittedAt        time.Time `json:"admitted_at"`
	FoundDate         string    `json:"found_date"` // YYYY-MM-DD
	FoundPlace        string    `json:"found_place"`
	FoundLat          *float64  `json:"found_lat,omitempty"` // decimal degrees, WGS 84
	FoundLon          *float64  `json:"found_lon,omitempty"`
	// FinderName and FinderContact are personal data: an export leaves them
	// out unless asked to include them.
	FinderName      string      `json:"finder_name,omitempty"`
	FinderContact   string      `json:"finder_contact,omitempty"`
	Reason          string      `json:"reason"`
	IntakeCondition string      `json:"intake_condition"`
	IntakeMassG     float64     `json:"intake_mass_g"` // 0 = not recorded
	Status          Disposition `json:"status"`
	StatusDate      string      `json:"status_date"` // YYYY-MM-DD; "" while in care
}

// CaseSite is a release site in a case file.
type CaseSite struct {
	Name       string   `json:"name,omitempty"`
	ElevationM float64  `json:"elevation_m"`      // m, −500…5000
	TempC      *float64 `json:"temp_c,omitempty"` // °C, −40…50; nil = standard atmosphere
}

// Site returns the site for the flight model.
func (s CaseSite) Site() Site { return Site{ElevationM: s.ElevationM, TempC: s.TempC} }

// maxCaseFileBytes bounds what ReadCaseFile reads: far above any real
// patient's record, low enough that a wrong file cannot exhaust memory.
const maxCaseFileBytes = 16 << 20

// ReadCaseFile reads and validates one case file. Bad JSON, a missing or
// unknown format_version, an unknown key, a bad vocabulary value, a
// number out of range or inconsistent records give a *ValidationError or
// ValidationErrors whose Field is the JSON path ("inputs.weigh_ins[2].mass_g").
func ReadCaseFile(r io.Reader) (CaseFile, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxCaseFileBytes+1))
	if err != nil {
		return CaseFile{}, fmt.Errorf("assess: read case file: %w", err)
	}
	if len(data) > maxCaseFileBytes {
		return CaseFile{}, &ValidationError{Field: "case file", Value: fmt.Sprintf("%d bytes", len(data)),
			Message: fmt.Sprintf("a case file is at most %d MiB", maxCaseFileBytes>>20)}
	}
	if err := checkVersion(data); err != nil {
		return CaseFile{}, err
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var cf CaseFile
	if err := dec.Decode(&cf); err != nil {
		return CaseFile{}, jsonError(err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return CaseFile{}, &ValidationError{Field: "case file", Value: "", Message: "unexpected data after the case file's closing brace"}
	}
	cf.fillInputs()
	if err := cf.Validate(); err != nil {
		return CaseFile{}, err
	}
	return cf, nil
}

// checkVersion reads format_version alone, so a file of another version is
// refused for its version rather than for the keys it has.
func checkVersion(data []byte) error {
	var probe struct {
		FormatVersion json.RawMessage `json:"format_version"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return jsonError(err)
	}
	raw := strings.TrimSpace(string(probe.FormatVersion))
	if raw == "" || raw == "null" {
		return &ValidationError{Field: "format_version", Value: "",
			Message: fmt.Sprintf("a case file starts with its format version: \"format_version\": %d", CaseFileVersion)}
	}
	if v, err := strconv.Atoi(raw); err != nil || v != CaseFileVersion {
		return &ValidationError{Field: "format_version", Value: raw,
			Message: fmt.Sprintf("unknown case-file format version: this Aloft reads version %d", CaseFileVersion)}
	}
	return nil
}

// jsonError turns a decoding error into a *ValidationError naming where.
func jsonError(err error) error {
	var syn *json.SyntaxError
	var typ *json.UnmarshalTypeError
	switch {
	case errors.As(err, &syn):
		return &ValidationError{Field: "case file", Value: fmt.Sprintf("byte %d", syn.Offset), Message: "not valid JSON: " + syn.Error()}
	case errors.As(err, &typ):
		field := typ.Field
		if field == "" {
			field = "case file"
		}
		return &ValidationError{Field: field, Value: typ.Value, Message: "expected " + jsonKind(typ.Type.String())}
	case errors.Is(err, io.EOF), errors.Is(err, io.ErrUnexpectedEOF):
		return &ValidationError{Field: "case file", Value: "", Message: "the case file is empty or cut short"}
	}
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "json: unknown field "); ok {
		return &ValidationError{Field: strings.Trim(name, `"`), Value: "", Message: "unknown key: check its spelling against the case-file format"}
	}
	return &ValidationError{Field: "case file", Value: "", Message: strings.TrimPrefix(msg, "json: ")}
}

// jsonKind names a Go type as a JSON value for people.
func jsonKind(goType string) string {
	switch {
	case strings.Contains(goType, "time.Time"):
		return "a date and time in RFC 3339, e.g. 2025-05-01T09:30:00Z"
	case strings.Contains(goType, "int"):
		return "a whole number"
	case strings.Contains(goType, "float"):
		return "a number"
	case strings.Contains(goType, "bool"):
		return "true or false"
	case strings.HasPrefix(goType, "[]"):
		return "a list"
	case strings.Contains(goType, "string"), strings.HasPrefix(goType, "assess."):
		return "a string"
	}
	return "a value of type " + goType
}

// fillInputs takes the inputs' sex, age class and admission time from the
// patient where the inputs leave them empty.
func (cf *CaseFile) fillInputs() {
	if cf.Inputs.Sex == "" {
		cf.Inputs.Sex = cf.Patient.Sex
	}
	if cf.Inputs.AgeClass == "" {
		cf.Inputs.AgeClass = cf.Patient.AgeClass
	}
	if cf.Inputs.AdmittedAt.IsZero() {
		cf.Inputs.AdmittedAt = cf.Patient.AdmittedAt
	}
}

// WriteCaseFile validates cf and writes it as indented JSON with a final
// newline, format_version set. Empty record lists are written as [].
// The same case file always gives the same bytes.
func WriteCaseFile(w io.Writer, cf CaseFile) error {
	cf.FormatVersion = CaseFileVersion
	cf.fillInputs()
	if err := cf.Validate(); err != nil {
		return err
	}
	in := &cf.Inputs
	in.WeighIns = emptyIfNil(in.WeighIns)
	in.Conditions = emptyIfNil(in.Conditions)
	in.Wings = emptyIfNil(in.Wings)
	in.Trials = emptyIfNil(in.Trials)
	in.Sessions = emptyIfNil(in.Sessions)
	in.Waterproofing = emptyIfNil(in.Waterproofing)
	in.Housing = emptyIfNil(in.Housing)
	in.Clearances = emptyIfNil(in.Clearances)
	b, err := json.MarshalIndent(cf, "", "  ")
	if err != nil {
		return fmt.Errorf("assess: write case file: %w", err)
	}
	if _, err := w.Write(append(b, '\n')); err != nil {
		return fmt.Errorf("assess: write case file: %w", err)
	}
	return nil
}

func emptyIfNil[T any](xs []T) []T {
	if xs == nil {
		return []T{}
	}
	return xs
}

// Evaluate assesses the case file's patient: Evaluate with its inputs, its
// species and the site given (the case file's own site when site is nil).
func (cf CaseFile) Evaluate(th Thresholds, site *Site, now time.Time) (Assessment, error) {
	s := Site{}
	switch {
	case site != nil:
		s = *site
	case cf.Site != nil:
		s = cf.Site.Site()
	}
	sp := cf.Species
	return Evaluate(cf.Inputs, &sp, th, s, now)
}
