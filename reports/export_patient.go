package reports

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"time"

	"aloft/assess"
	"aloft/records"
)

// HistoryRow is one version of one record of a patient, as the per-patient
// CSV lists it.
type HistoryRow struct {
	Record     string // "intake", a record kind (e.g. "weigh-in", "exam") or "disposition"
	Key        int64  // the record's id, the same for every version (the patient id for the intake)
	Version    int
	State      string // "current", "superseded" (corrected since) or "removed"
	At         string // when observed: RFC 3339 UTC, or YYYY-MM-DD for a disposition
	RecordedAt string // when typed in, RFC 3339 UTC
	RecordedBy string // the recording user's name, "system" for the demo or the command line
	Summary    string // field=value pairs, sorted by field, separated by "; "
}

// PatientCSVHeader is the per-patient CSV's columns.
var PatientCSVHeader = []string{"case_number", "record", "key", "version", "state", "at", "recorded_at", "recorded_by", "summary"}

// PatientHistory returns a patient's whole record, one row per version of
// every record: the intake (its current version; earlier intake details are
// in the audit trail), then every entry in the order observed (superseded
// and removed versions included, a removal's reason in its summary), then
// every version of the disposition. Finders' personal data only with
// opts.IncludeFinders.
func PatientHistory(ctx context.Context, store *records.Store, caseNumber string, opts ExportOptions) (records.Patient, []HistoryRow, error) {
	p, err := store.PatientByCase(ctx, caseNumber)
	if err != nil {
		return p, nil, err
	}
	rows := []HistoryRow{intakeRow(ctx, store, p, opts)}
	entries, err := store.Entries(ctx, p.ID, records.EntryFilter{AllVersions: true})
	if err != nil {
		return p, nil, err
	}
	for _, e := range entries {
		rows = append(rows, entryRow(e))
	}
	disps, err := store.DispositionVersions(ctx, p.ID)
	if err != nil {
		return p, nil, err
	}
	for _, d := range disps {
		rows = append(rows, dispositionRow(d))
	}
	return p, rows, nil
}

func stamp(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(time.RFC3339)
}

func intakeRow(ctx context.Context, store *records.Store, p records.Patient, opts ExportOptions) HistoryRow {
	by := "system"
	if u, err := store.User(ctx, p.CreatedBy); err == nil {
		by = u.DisplayName
	}
	f := map[string]any{"species_scientific": p.SpeciesScientific, "species_common": p.SpeciesCommon,
		"age_class": p.AgeClass, "sex": string(p.Sex), "found_date": p.FoundDate, "found_place": p.FoundPlace,
		"found_lat": p.FoundLat, "found_lon": p.FoundLon, "reason": p.Reason, "intake_condition": p.IntakeCondition,
		"intake_mass_g": p.IntakeMassG, "mass_note": p.MassNote}
	if opts.IncludeFinders {
		f["finder_name"], f["finder_contact"] = p.FinderName, p.FinderContact
	}
	return HistoryRow{Record: "intake", Key: p.ID, Version: p.Version, State: "current", At: stamp(p.AdmittedAt),
		RecordedAt: stamp(p.AdmittedAt), RecordedBy: by, Summary: summarise(f)}
}

func entryRow(e records.Entry) HistoryRow {
	var data any
	dec := json.NewDecoder(bytes.NewReader(e.Data))
	dec.UseNumber()
	if err := dec.Decode(&data); err != nil {
		data = string(e.Data)
	}
	f := map[string]any{}
	flatten("", data, f)
	delete(f, "at") // its own column
	state := "current"
	switch {
	case e.RemovedAt != nil:
		state = "removed"
		f["removed_reason"], f["removed_by"], f["removed_at"] = e.RemovedReason, e.RemovedBy, stamp(*e.RemovedAt)
	case e.Superseded:
		state = "superseded"
	}
	return HistoryRow{Record: string(e.Kind), Key: e.Key, Version: e.Version, State: state, At: stamp(e.At),
		RecordedAt: stamp(e.CreatedAt), RecordedBy: e.ByName, Summary: summarise(f)}
}

func dispositionRow(d records.Disposition) HistoryRow {
	f := map[string]any{"kind": string(d.Kind), "place": d.Place, "lat": d.Lat, "lon": d.Lon, "receiver": d.Receiver,
		"reason": d.Reason, "report_version_id": d.ReportVersionID, "no_report_reason": d.NoReportReason,
		"performed_by": d.PerformedBy, "note": d.Note}
	state := "current"
	if d.Superseded {
		state = "superseded"
	}
	return HistoryRow{Record: "disposition", Key: d.Key, Version: d.Version, State: state, At: d.Date,
		RecordedAt: stamp(d.CreatedAt), RecordedBy: d.RecordedByName, Summary: summarise(f)}
}

// flatten writes v's leaves into out under dotted keys (wing.primaries.0).
func flatten(prefix string, v any, out map[string]any) {
	join := func(k string) string {
		if prefix == "" {
			return k
		}
		return prefix + "." + k
	}
	switch x := v.(type) {
	case map[string]any:
		for k, sub := range x {
			flatten(join(k), sub, out)
		}
	case []any:
		for i, sub := range x {
			flatten(join(strconv.Itoa(i)), sub, out)
		}
	default:
		if prefix == "" {
			prefix = "data"
		}
		out[prefix] = x
	}
}

// summarise writes fields as "k=v; k=v" sorted by key, leaving out empty
// strings and nils.
func summarise(f map[string]any) string {
	keys := make([]string, 0, len(f))
	for k := range f {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	var parts []string
	for _, k := range keys {
		if s, ok := value(f[k]); ok {
			parts = append(parts, k+"="+s)
		}
	}
	return strings.Join(parts, "; ")
}

func value(v any) (string, bool) {
	switch x := v.(type) {
	case nil:
		return "", false
	case string:
		return x, x != ""
	case *float64:
		if x == nil {
			return "", false
		}
		return strconv.FormatFloat(*x, 'f', -1, 64), true
	case *int64:
		if x == nil {
			return "", false
		}
		return strconv.FormatInt(*x, 10), true
	case float64:
		return strconv.FormatFloat(x, 'f', -1, 64), true
	}
	return fmt.Sprint(v), true
}

// WritePatientCSV writes a patient's history, columns as PatientCSVHeader:
// key and version are numbers, the rest text.
func WritePatientCSV(w io.Writer, caseNumber string, rows []HistoryRow, opts CSVOptions) error {
	out := make([][]Cell, 0, len(rows))
	for _, r := range rows {
		out = append(out, []Cell{Text(caseNumber), Text(r.Record), Int(int(r.Key)), Int(r.Version), Text(r.State),
			Text(r.At), Text(r.RecordedAt), Text(r.RecordedBy), Text(r.Summary)})
	}
	return WriteCSV(w, opts, PatientCSVHeader, out)
}

// WritePatientCaseFile writes a patient's record as its case file (the
// JSON of assess.WriteCaseFile, which `aloft assess --input` reads back).
// Finders' personal data only with opts.IncludeFinders. A missing patient
// gives records.ErrNotFound; records that do not make a valid case file,
// assess.ValidationErrors.
func WritePatientCaseFile(ctx context.Context, w io.Writer, store *records.Store, caseNumber string, opts ExportOptions) error {
	get := store.CaseFile
	if opts.IncludeFinders {
		get = store.CaseFileWithFinder
	}
	cf, err := get(ctx, caseNumber)
	if err != nil {
		return err
	}
	return assess.WriteCaseFile(w, cf)
}
