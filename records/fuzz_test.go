package records_test

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// The store's validators and writes under arbitrary input, each against a
// real SQLite file (one per fuzz worker). The contract (DESIGN.md, Units):
// "Nothing invalid is stored; nothing valid is lost" — so Validate never
// panics, a refusal names its fields, the store refuses what Validate
// refuses and writes nothing, accepts everything Validate accepts, and
// what it stored reads back equal and valid again.

// fzRefusal fails unless err is a field-naming validation refusal.
func fzRefusal(t *testing.T, what string, err error) {
	t.Helper()
	var es assess.ValidationErrors
	if !errors.As(err, &es) || len(es) == 0 {
		t.Fatalf("%s: %v (%T), want ValidationErrors", what, err, err)
	}
	for _, e := range es {
		if e.Field == "" || e.Message == "" {
			t.Fatalf("%s: refusal %#v names no field or says nothing", what, e)
		}
	}
}

func fzCount(t *testing.T, s *records.Store, table string) int {
	t.Helper()
	var n int
	if err := s.DB().QueryRow(`SELECT count(*) FROM ` + table).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

// fzCoords returns the coordinates the bits of has ask for.
func fzCoords(has uint8, lat, lon float64) (*float64, *float64) {
	var a, b *float64
	if has&1 != 0 {
		a = &lat
	}
	if has&2 != 0 {
		b = &lon
	}
	return a, b
}

func fzSameCoord(a, b *float64) bool {
	return (a == nil) == (b == nil) && (a == nil || *a == *b)
}

// inputOf is the intake a stored patient was admitted with.
func inputOf(p records.Patient) records.PatientInput {
	return records.PatientInput{SpeciesScientific: p.SpeciesScientific, SpeciesCommon: p.SpeciesCommon, AgeClass: p.AgeClass,
		Sex: p.Sex, FoundDate: p.FoundDate, FoundPlace: p.FoundPlace, FoundLat: p.FoundLat, FoundLon: p.FoundLon,
		FinderName: p.FinderName, FinderContact: p.FinderContact, Reason: p.Reason, IntakeCondition: p.IntakeCondition,
		IntakeMassG: p.IntakeMassG, MassNote: p.MassNote, AdmittedAt: p.AdmittedAt}
}

// FuzzAdmitPatient: any intake is refused with field errors and nothing
// stored, or stored and read back exactly as given.
func FuzzAdmitPatient(f *testing.F) {
	f.Add("Buteo jamaicensis", "adult", "female", "2026-06-14", "Field by the A6", "Ada Finder", "555-0100", "hit by car", "", "", 1150.0, 42.45, -76.51, uint8(3))
	f.Add(" Anas platyrhynchos ", "unknown", "unknown", "2026-06-15", "", "", "", "oiled", "wet", "weighed in a carrier", 1.5, 0.0, 0.0, uint8(0))
	f.Add("x", "hatchling", "male", "1996-06-16", "<script>alert(1)</script>", "'; DROP TABLE patients; --", "=HYPERLINK(\"http://x\")", "\x00\xff", "é", "", 22000.0, 90.0, 180.0, uint8(3))
	f.Add("", "adult", "other", "2026-13-01", "", "", "", " ", "", "", math.NaN(), math.Inf(1), -180.1, uint8(1))
	f.Add("Cygnus olor", "adult", "female", "2026-06-16", "", "", "", "swan", "", "", 1.4999, -90.0, 0.0, uint8(2))
	ctx := context.Background()
	s := recordstest.Open(f, nil)
	f.Fuzz(func(t *testing.T, species, age, sex, found, place, finder, contact, reason, cond, note string,
		massG, lat, lon float64, coords uint8) {
		in := records.PatientInput{SpeciesScientific: species, AgeClass: age, Sex: assess.Sex(sex), FoundDate: found,
			FoundPlace: place, FinderName: finder, FinderContact: contact, Reason: reason, IntakeCondition: cond,
			MassNote: note, IntakeMassG: massG}
		in.FoundLat, in.FoundLon = fzCoords(coords, lat, lon)
		before := fzCount(t, s, "patients")
		verr := in.Validate(recordstest.Epoch)
		p, err := s.AdmitPatient(ctx, 0, in)
		if verr != nil {
			fzRefusal(t, "Validate", verr)
			fzRefusal(t, "AdmitPatient", err)
			if n := fzCount(t, s, "patients"); n != before {
				t.Fatalf("a refused intake stored %d patients", n-before)
			}
			return
		}
		if err != nil {
			t.Fatalf("AdmitPatient(%+v) = %v; Validate accepted it, so the store must keep it", in, err)
		}
		got, err := s.PatientByCase(ctx, p.CaseNumber)
		if err != nil {
			t.Fatal(err)
		}
		back := inputOf(got)
		want := in
		want.SpeciesScientific = strings.TrimSpace(in.SpeciesScientific)
		want.AdmittedAt = back.AdmittedAt
		if back.SpeciesScientific != want.SpeciesScientific || back.AgeClass != want.AgeClass || back.Sex != want.Sex ||
			back.FoundDate != want.FoundDate || back.FoundPlace != want.FoundPlace || back.FinderName != want.FinderName ||
			back.FinderContact != want.FinderContact || back.Reason != want.Reason || back.IntakeCondition != want.IntakeCondition ||
			back.MassNote != want.MassNote || back.IntakeMassG != want.IntakeMassG ||
			!fzSameCoord(back.FoundLat, want.FoundLat) || !fzSameCoord(back.FoundLon, want.FoundLon) {
			t.Fatalf("stored patient reads back as %+v, want %+v", back, want)
		}
		if err := back.Validate(recordstest.Epoch); err != nil {
			t.Fatalf("the stored patient no longer validates: %v", err)
		}
		if audit, err := s.Audit(ctx, records.AuditFilter{Entity: "patient", EntityID: p.ID}); err != nil || len(audit) != 1 {
			t.Fatalf("admission left %d audit rows (%v), want 1", len(audit), err)
		}
	})
}

// FuzzAddEnclosure: any enclosure is refused with field errors and nothing
// stored, or stored and read back exactly as given (a name already used is
// a refusal on "name").
func FuzzAddEnclosure(f *testing.F) {
	f.Add("Flight cage 1", "flight-cage", "", 15.0, 3.0, 3.6, false)
	f.Add("  Pool  ", "pool", "salt water", 4.0, 2.0, 1.0, true)
	f.Add("<img src=x onerror=alert(1)>", "indoor-cage", "'; DROP TABLE enclosures; --", 300.0, 300.0, 50.0, false)
	f.Add("", "aviary", "", 0.0, -1.0, math.NaN(), false)
	f.Add("x", "outdoor-aviary", strings.Repeat("é", 2001), math.Inf(1), 1e-300, 50.0000001, false)
	ctx := context.Background()
	s := recordstest.Open(f, nil)
	f.Fuzz(func(t *testing.T, name, kind, notes string, length, width, height float64, retired bool) {
		in := records.EnclosureInput{Name: name, Kind: assess.EnclosureKind(kind), Notes: notes, LengthM: length,
			WidthM: width, HeightM: height, Retired: retired}
		before := fzCount(t, s, "enclosures")
		verr := in.Validate()
		e, err := s.AddEnclosure(ctx, 0, in)
		if verr != nil || err != nil {
			if verr != nil {
				fzRefusal(t, "Validate", verr)
			}
			fzRefusal(t, "AddEnclosure", err)
			if verr == nil {
				if _, taken := s.EnclosureByName(ctx, name); taken != nil {
					t.Fatalf("AddEnclosure(%+v) = %v: Validate accepted it and the name is free", in, err)
				}
			}
			if n := fzCount(t, s, "enclosures"); n != before {
				t.Fatalf("a refused enclosure stored %d rows", n-before)
			}
			return
		}
		got, err := s.Enclosure(ctx, e.ID)
		if err != nil {
			t.Fatal(err)
		}
		back := records.EnclosureInput{Name: got.Name, Kind: got.Kind, Notes: got.Notes, LengthM: got.LengthM,
			WidthM: got.WidthM, HeightM: got.HeightM, Retired: got.Retired}
		want := in
		want.Name = strings.TrimSpace(in.Name)
		if back != want {
			t.Fatalf("stored enclosure reads back as %+v, want %+v", back, want)
		}
		if err := back.Validate(); err != nil {
			t.Fatalf("the stored enclosure no longer validates: %v", err)
		}
	})
}

// FuzzDispose: any disposition of a patient in care is refused with field
// errors (and the patient stays in care), or stored, normalised, and read
// back equal and valid. Releases need the rehabilitator's role.
func FuzzDispose(f *testing.F) {
	f.Add("released", "2026-06-15", "Harbour", "", "", "judged in person", "", "", 42.45, -76.51, uint8(3), true)
	f.Add("transferred", "2026-06-15", "Hill Centre", "Hill Centre", "", "", "A. Person", "", 0.0, 0.0, uint8(0), false)
	f.Add("died", "2026-06-15", "", "", "unknown", "", "", "", 0.0, 0.0, uint8(0), false)
	f.Add("released", "2026-06-15", "Harbour", "", "", "no report", "", "", 0.0, 0.0, uint8(0), false)
	f.Add("in-care", "2026-06-16", " ", "x", " ", " ", "\x00", "=1+1", math.NaN(), 181.0, uint8(1), true)
	f.Add("euthanised", "2026-06-14", "", "", "<script>alert(1)</script>", "", "", "", -90.0, 180.0, uint8(3), false)
	ctx := context.Background()
	s := recordstest.Open(f, nil)
	rehab := recordstest.AddUser(f, s, "rehab", records.RoleRehabilitator)
	staff := recordstest.AddUser(f, s, "staff", records.RoleStaff)
	f.Fuzz(func(t *testing.T, kind, date, place, receiver, reason, noReport, performedBy, note string,
		lat, lon float64, coords uint8, asRehab bool) {
		p, err := s.AdmitPatient(ctx, 0, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
		if err != nil {
			t.Fatal(err)
		}
		actor := staff
		if asRehab {
			actor = rehab
		}
		in := records.DispositionInput{Kind: assess.Disposition(kind), Date: date, Place: place, Receiver: receiver,
			Reason: reason, NoReportReason: noReport, PerformedBy: performedBy, Note: note}
		in.Lat, in.Lon = fzCoords(coords, lat, lon)
		norm := in.Normalise()
		norm.Note = ""
		verr := norm.Validate(p, recordstest.Epoch)
		d, err := s.Dispose(ctx, actor.ID, p.ID, in)
		forbidden := records.IsRelease(norm.Kind) && !asRehab
		switch {
		case verr != nil:
			fzRefusal(t, "Validate", verr)
			fzRefusal(t, "Dispose", err)
		case forbidden:
			if !errors.Is(err, records.ErrForbidden) {
				t.Fatalf("a release by staff: %v, want ErrForbidden", err)
			}
		case err != nil:
			t.Fatalf("Dispose(%+v) = %v; Validate accepted it, so the store must keep it", in, err)
		}
		after, _ := s.Patient(ctx, p.ID)
		if verr != nil || forbidden {
			if !after.InCare() {
				t.Fatalf("a refused disposition took the patient out of care: %+v", after)
			}
			return
		}
		got, err := s.Disposition(ctx, p.ID)
		if err != nil {
			t.Fatal(err)
		}
		if norm.PerformedBy == "" {
			norm.PerformedBy = actor.DisplayName // "" means the person recording it
		}
		if got.Kind != norm.Kind || got.Date != norm.Date || got.Place != norm.Place || got.Receiver != norm.Receiver ||
			got.Reason != norm.Reason || got.NoReportReason != norm.NoReportReason || got.PerformedBy != norm.PerformedBy ||
			!fzSameCoord(got.Lat, norm.Lat) || !fzSameCoord(got.Lon, norm.Lon) || got.Key != d.Key {
			t.Fatalf("stored disposition %+v, want %+v", got.DispositionInput, norm)
		}
		if err := got.DispositionInput.Validate(p, recordstest.Epoch); err != nil {
			t.Fatalf("the stored disposition no longer validates: %v", err)
		}
		if string(after.Status) != string(norm.Kind) || after.StatusDate != norm.Date {
			t.Fatalf("patient status %s on %s, want %s on %s", after.Status, after.StatusDate, norm.Kind, norm.Date)
		}
	})
}

// FuzzAddUser: any account is refused with field errors, or stored with
// its roles, and the password that was accepted logs in (bcrypt reads only
// 72 bytes, so a longer one must be refused, not silently cut).
func FuzzAddUser(f *testing.F) {
	f.Add("kim", "Kim Staff", "correct horse battery", "staff")
	f.Add("a.b-c_d", "  Vet Person  ", "0123456789", "vet,admin,vet")
	f.Add("x", "", "short", "")
	f.Add("toolong-toolong-toolong-toolong-toolong-1", "<script>alert(1)</script>", strings.Repeat("p", 73), "root")
	f.Add("ünïcode", "Name", strings.Repeat("é", 36), "rehabilitator")
	ctx := context.Background()
	s := recordstest.Open(f, nil)
	f.Fuzz(func(t *testing.T, username, display, password, roleList string) {
		var roles []records.Role
		for _, r := range strings.Split(roleList, ",") {
			if r != "" {
				roles = append(roles, records.Role(r))
			}
		}
		nu := records.NewUser{Username: username, DisplayName: display, Password: password, Roles: roles}
		before := fzCount(t, s, "users")
		verr := nu.Validate()
		u, err := s.AddUser(ctx, 0, nu)
		if verr != nil || err != nil {
			if verr != nil {
				fzRefusal(t, "Validate", verr)
			}
			fzRefusal(t, "AddUser", err)
			if verr == nil {
				if _, taken := s.UserByName(ctx, username); taken != nil {
					t.Fatalf("AddUser(%q) = %v: Validate accepted it and the name is free", username, err)
				}
			}
			if n := fzCount(t, s, "users"); n != before {
				t.Fatalf("a refused account stored %d users", n-before)
			}
			return
		}
		got, err := s.Authenticate(ctx, username, password)
		if err != nil || got.ID != u.ID {
			t.Fatalf("the accepted password of %q does not log in: %v", username, err)
		}
		if len(password) >= 72 {
			if _, err := s.Authenticate(ctx, username, password[:71]); err == nil {
				t.Fatalf("a prefix of %q's password logs in", username)
			}
		}
		for _, r := range roles {
			if !got.Has(r) {
				t.Fatalf("%q stored with roles %v, want %v", username, got.Roles, roles)
			}
		}
		if strings.TrimSpace(got.DisplayName) != got.DisplayName || got.DisplayName == "" {
			t.Fatalf("display name stored as %q", got.DisplayName)
		}
	})
}
