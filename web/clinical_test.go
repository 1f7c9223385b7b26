package web

import (
	"context"
	"fmt"
	"net/http"
	"net/url"
	"os"
	"strings"
	"testing"

	"github.com/PuerkitoBio/goquery"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// Clinical values below are invented test inputs: these tests check the
// forms, messages, versions and roles, not clinical content.

func (a *testApp) clinAdmit(species, common string, massG float64) records.Patient {
	a.t.Helper()
	p, err := a.store.AdmitPatient(context.Background(), 0, recordstest.Intake(species, common, massG))
	if err != nil {
		a.t.Fatal(err)
	}
	return p
}

// clinicalForms are valid posts of each kind's form (test clock: 2026-06-15 09:00).
func clinicalForms() map[records.Kind]url.Values {
	return map[records.Kind]url.Values{
		records.KindExam: {"at": {"2026-06-15T08:30"}, "eye_left": {"normal"}, "eye_right": {"abnormal"},
			"eyes_note": {"hyphema"}, "feet_legs": {"normal"}, "keel_score": {"2"}, "feathers": {"not-examined"},
			"hydration": {"mild"}, "findings_general": {"quiet, alert"}},
		records.KindDiagnosis: {"at": {"2026-06-15T08:30"}, "condition": {"keel abrasion"}, "status": {"active"}},
		records.KindTreatment: {"at": {"2026-06-15T08:30"}, "procedure": {"wound dressed"}},
		records.KindMedication: {"at": {"2026-06-15T08:30"}, "drug": {"meloxicam oral suspension"}, "dose": {"0.5"},
			"dose_unit": {"mg/kg"}, "route": {"PO"}, "every_hours": {"24"}, "first_dose": {"08:00"},
			"start": {"2026-06-15"}, "end": {"2026-06-19"}, "prescriber": {"Dr Test"}},
		records.KindLab: {"at": {"2026-06-15T08:30"}, "test": {"packed cell volume"}, "value": {"38"}, "unit": {"%"},
			"ref_low": {"35"}, "ref_high": {"55"}},
		records.KindDiseaseTest: {"at": {"2026-06-15T08:30"}, "test": {"avian influenza A, PCR"},
			"sample": {"oropharyngeal swab"}, "result": {"pending"}},
	}
}

func clinicalPath(p records.Patient, kind records.Kind) string {
	return "/patients/" + p.CaseNumber + "/clinical/" + string(kind)
}

func TestClinical_AddEachKind(t *testing.T) {
	shown := map[records.Kind]string{records.KindExam: "Eyes: left normal, right abnormal (hyphema)",
		records.KindDiagnosis: "keel abrasion", records.KindTreatment: "wound dressed",
		records.KindMedication: "0.5 mg/kg PO, every 24 h", records.KindLab: "packed cell volume: 38 %",
		records.KindDiseaseTest: "avian influenza A, PCR"}
	for kind, form := range clinicalForms() {
		t.Run(string(kind), func(t *testing.T) {
			a := newTestApp(t)
			a.login("kim", records.RoleStaff)
			p := a.clinAdmit("Buteo jamaicensis", "Red-tailed Hawk", 1100)
			resp, doc := a.get(clinicalPath(p, kind) + "/new")
			wantStatus(t, resp, http.StatusOK)
			if doc.Find("[data-testid=clinical-form]").Length() != 1 {
				t.Fatal("no form on the new-record page")
			}
			resp, _ = a.post(clinicalPath(p, kind), form)
			wantStatus(t, resp, http.StatusSeeOther)
			_, doc = a.get("/patients/" + p.CaseNumber)
			if got := doc.Find("[data-testid=section-clinical]").Text(); !strings.Contains(got, shown[kind]) {
				t.Errorf("clinical section does not show %q:\n%s", shown[kind], got)
			}
			if !strings.Contains(doc.Find("[data-testid=section-clinical]").Text(), "Test kim") {
				t.Error("the record is not attributed to its author")
			}
		})
	}
}

// clinFieldError returns the message shown beside field: the first
// .field-error after it.
func clinFieldError(doc *goquery.Document, field string) string {
	return doc.Find("#"+field).NextFilteredUntil(".field-error", "label").First().Text()
}

func TestClinical_Validation(t *testing.T) {
	cases := []struct {
		name  string
		kind  records.Kind
		field string
		value string
		want  string
	}{
		{"ErrDoseZero", records.KindMedication, "dose", "0", "above 0"},
		{"ErrDoseNegative", records.KindMedication, "dose", "-2", "above 0"},
		{"ErrDoseMissing", records.KindMedication, "dose", "", "required"},
		{"ErrDoseText", records.KindMedication, "dose", "half", "enter a number"},
		{"ErrDoseUnitMissing", records.KindMedication, "dose_unit", "", "unit"},
		{"ErrEndBeforeStart", records.KindMedication, "end", "2026-06-10", "before the start"},
		{"ErrEndNotADate", records.KindMedication, "end", "next week", "YYYY-MM-DD"},
		{"ErrInterval", records.KindMedication, "every_hours", "5", "how often"},
		{"ErrRoute", records.KindMedication, "route", "", "route"},
		{"ErrPrescriber", records.KindMedication, "prescriber", "", "prescribing vet"},
		{"ErrDiagnosisStatus", records.KindDiagnosis, "status", "cured", "active or resolved"},
		{"ErrDiagnosisCondition", records.KindDiagnosis, "condition", "", "name the condition"},
		{"ErrKeelScore", records.KindExam, "keel_score", "7", "0 to 3"},
		{"ErrEyeNote", records.KindExam, "eyes_note", "", "describe what is abnormal"},
		{"ErrLabRefText", records.KindLab, "ref_low", "low", "enter a number"},
		{"ErrLabRangeReversed", records.KindLab, "ref_high", "20", "below its bottom"},
		{"ErrDiseaseResult", records.KindDiseaseTest, "result", "maybe", "pending, negative"},
		{"ErrAtMissing", records.KindTreatment, "at", "", "date and time"},
		{"ErrAtFuture", records.KindTreatment, "at", "2026-07-01T10:00", "future"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			a.login("kim", records.RoleStaff)
			p := a.clinAdmit("Buteo jamaicensis", "Red-tailed Hawk", 1100)
			a.get(clinicalPath(p, tc.kind) + "/new")
			form := clinicalForms()[tc.kind]
			form.Set(tc.field, tc.value)
			resp, doc := a.post(clinicalPath(p, tc.kind), form)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			if got := clinFieldError(doc, tc.field); !strings.Contains(got, tc.want) {
				t.Errorf("%s=%q: message beside the field %q, want it to contain %q", tc.field, tc.value, got, tc.want)
			}
			for name, vs := range form {
				el := doc.Find("#" + name)
				if el.Length() == 0 || goquery.NodeName(el) != "input" {
					continue
				}
				if got, _ := el.Attr("value"); got != vs[0] {
					t.Errorf("field %s shows %q after the error, want what was typed, %q", name, got, vs[0])
				}
			}
			all, _ := a.store.Entries(context.Background(), p.ID, records.EntryFilter{AllVersions: true})
			if len(all) != 0 {
				t.Errorf("%d entries stored after a refused form, want 0", len(all))
			}
		})
	}
}

func TestClinical_CorrectAndRemove(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := a.clinAdmit("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	a.get(clinicalPath(p, records.KindMedication) + "/new")
	resp, _ := a.post(clinicalPath(p, records.KindMedication), clinicalForms()[records.KindMedication])
	wantStatus(t, resp, http.StatusSeeOther)
	meds, _ := a.store.Medications(context.Background(), p.ID)
	key := meds[0].Entry.Key
	edit := fmt.Sprintf("%s/%d", clinicalPath(p, records.KindMedication), key)

	resp, doc := a.get(edit)
	wantStatus(t, resp, http.StatusOK)
	if got, _ := doc.Find("#dose").Attr("value"); got != "0.5" {
		t.Errorf("correction form shows dose %q, want the stored 0.5", got)
	}
	form := clinicalForms()[records.KindMedication]
	form.Set("version", "1")
	form.Set("dose", "0.3")
	resp, _ = a.post(edit, form)
	wantStatus(t, resp, http.StatusSeeOther)

	t.Run("ErrStaleVersion", func(t *testing.T) {
		a.get(edit)
		resp, doc := a.post(edit, form) // still version 1
		wantStatus(t, resp, http.StatusConflict)
		if doc.Find("[data-testid=form-problem]").Length() != 1 {
			t.Error("no message about the conflicting change")
		}
	})
	_, doc = a.get(edit)
	if n := doc.Find("[data-testid=versions] li").Length(); n != 2 {
		t.Errorf("versions list has %d entries, want 2", n)
	}
	t.Run("ErrRemoveWithoutReason", func(t *testing.T) {
		resp, doc := a.post(edit+"/remove", url.Values{"reason": {" "}})
		wantStatus(t, resp, http.StatusUnprocessableEntity)
		if got := clinFieldError(doc, "reason"); !strings.Contains(got, "why") {
			t.Errorf("reason message %q", got)
		}
	})
	resp, _ = a.post(edit+"/remove", url.Values{"reason": {"prescribed for another bird"}})
	wantStatus(t, resp, http.StatusSeeOther)
	_, doc = a.get("/patients/" + p.CaseNumber)
	if doc.Find("[data-testid=medications] li").Length() != 0 {
		t.Error("removed medication still listed")
	}
	resp, _ = a.get(edit)
	wantStatus(t, resp, http.StatusGone)
	vs, _ := a.store.EntryVersions(context.Background(), key)
	if len(vs) != 2 || vs[1].RemovedReason != "prescribed for another bird" {
		t.Errorf("history = %+v, want both versions, the last removed with its reason", vs)
	}
}

func TestClinical_NotFound(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := a.clinAdmit("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	q := a.clinAdmit("Anas platyrhynchos", "Mallard", 1000)
	e, _ := a.store.AddTreatment(context.Background(), 0, q.ID, assess.Treatment{At: recordstest.Epoch, Procedure: "x"})
	for _, path := range []string{
		clinicalPath(p, "clearance") + "/new",
		clinicalPath(p, "weigh-in") + "/new",
		fmt.Sprintf("%s/%d", clinicalPath(p, records.KindTreatment), e.Key), // another patient's record
		fmt.Sprintf("%s/%d", clinicalPath(q, records.KindExam), e.Key),      // the wrong kind
	} {
		resp, _ := a.get(path)
		if resp.StatusCode != http.StatusNotFound {
			t.Errorf("GET %s: status %d, want 404", path, resp.StatusCode)
		}
	}
}

func TestClearance_StaffCannotSet(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff, records.RoleAdmin)
	p := a.clinAdmit("Accipiter cooperii", "Cooper's Hawk", 300)
	_, doc := a.get("/patients/" + p.CaseNumber)
	if doc.Find("[data-testid=clearance-form]").Length() != 0 {
		t.Error("staff see the clearance form")
	}
	if doc.Find("[data-testid=clearance-readonly]").Length() != 1 {
		t.Error("no note saying who may set clearance")
	}
	if n := doc.Find("[data-testid=clearance-items] > li").Length(); n != len(assess.ClearanceItems) {
		t.Errorf("%d items shown for a hawk, want all %d", n, len(assess.ClearanceItems))
	}
	resp, _ := a.post("/patients/"+p.CaseNumber+"/clearance", url.Values{"item": {"vision"}, "state": {"cleared"}})
	wantStatus(t, resp, http.StatusForbidden)
	resp, _ = a.get("/patients/" + p.CaseNumber + "/clearance")
	wantStatus(t, resp, http.StatusForbidden)
	hist, _ := a.store.ClearanceHistory(context.Background(), p.ID)
	if len(hist) != 0 {
		t.Errorf("refused post stored %d changes", len(hist))
	}
}

func TestClearance_VetSetsAndSeesIt(t *testing.T) {
	for _, role := range []records.Role{records.RoleVet, records.RoleRehabilitator} {
		t.Run(string(role), func(t *testing.T) {
			a := newTestApp(t)
			a.login("vic", role)
			p := a.clinAdmit("Accipiter cooperii", "Cooper's Hawk", 300)
			_, doc := a.get("/patients/" + p.CaseNumber)
			if doc.Find("[data-testid=clearance-form]").Length() != 1 {
				t.Fatal("no clearance form for a " + string(role))
			}
			resp, _ := a.post("/patients/"+p.CaseNumber+"/clearance", url.Values{"item": {"vision"}, "state": {"cleared"},
				"note": {"tracks food across the cage"}})
			wantStatus(t, resp, http.StatusSeeOther)
			_, doc = a.get("/patients/" + p.CaseNumber)
			item := doc.Find("[data-testid=clearance-vision]")
			if st, _ := item.Attr("data-state"); st != "cleared" {
				t.Errorf("vision state %q, want cleared", st)
			}
			want := fmt.Sprintf("Test vic (%s), %s", role, recordstest.Epoch.Local().Format("2006-01-02 15:04"))
			if got := item.Find("[data-testid=clearance-who]").Text(); got != want {
				t.Errorf("who and when %q, want %q", got, want)
			}
			if got := item.Find("[data-testid=clearance-note]").Text(); got != "tracks food across the cage" {
				t.Errorf("note %q", got)
			}
		})
	}
}

func TestClearance_Validation(t *testing.T) {
	cases := []struct {
		name, species, common string
		form                  url.Values
		field, want           string
	}{
		{"ErrNotClearedWithoutNote", "Accipiter cooperii", "Cooper's Hawk",
			url.Values{"item": {"vision"}, "state": {"not-cleared"}}, "note", "not yet right"},
		{"ErrUnknownItem", "Accipiter cooperii", "Cooper's Hawk",
			url.Values{"item": {"wings"}, "state": {"cleared"}}, "item", "clearance items"},
		{"ErrNoState", "Accipiter cooperii", "Cooper's Hawk",
			url.Values{"item": {"vision"}}, "state", "cleared, not cleared"},
		// Live-prey capture applies to raptors and owls only (PRACTICE.md).
		{"ErrLivePreyForDuck", "Anas platyrhynchos", "Mallard",
			url.Values{"item": {"live-prey"}, "state": {"cleared"}}, "item", "raptors and owls"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			a.login("vic", records.RoleVet)
			p := a.clinAdmit(tc.species, tc.common, 1000)
			a.get("/patients/" + p.CaseNumber)
			resp, doc := a.post("/patients/"+p.CaseNumber+"/clearance", tc.form)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			if got := doc.Find("[data-testid=clearance-form]").Text(); !strings.Contains(got, tc.want) {
				t.Errorf("form does not say %q:\n%s", tc.want, got)
			}
			hist, _ := a.store.ClearanceHistory(context.Background(), p.ID)
			if len(hist) != 0 {
				t.Errorf("refused post stored %d changes", len(hist))
			}
		})
	}
}

func TestClearance_ItemsFollowTheSpecies(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	duck := a.clinAdmit("Anas platyrhynchos", "Mallard", 1000)
	_, doc := a.get("/patients/" + duck.CaseNumber)
	if doc.Find("[data-testid=clearance-live-prey]").Length() != 0 {
		t.Error("live-prey capture listed for a duck")
	}
	if n := doc.Find("[data-testid=clearance-items] > li").Length(); n != len(assess.ClearanceItems)-1 {
		t.Errorf("%d items for a duck, want %d", n, len(assess.ClearanceItems)-1)
	}
}

// The clearance panel and the disease-test form show the cautions of the
// project's CAUTIONS.md that bear on them.
func TestClinical_ShowsCautions(t *testing.T) {
	md, err := os.ReadFile("../CAUTIONS.md")
	if err != nil {
		t.Fatal(err)
	}
	a := newTestApp(t)
	s := New(Config{Now: a.clock.Now, Cautions: string(md)}, a.store, speciesTable)
	a.srv.Config.Handler = s
	a.login("kim", records.RoleStaff)
	p := a.clinAdmit("Larus argentatus", "Herring Gull", 900)
	_, doc := a.get("/patients/" + p.CaseNumber)
	if got := doc.Find("[data-testid=section-clearance] [data-testid=clinical-caution]").Text(); !strings.Contains(got, "A good flight result is not enough") {
		t.Errorf("clearance panel cautions %q, want CAUTIONS.md's \"Before release\"", got)
	}
	_, doc = a.get(clinicalPath(p, records.KindDiseaseTest) + "/new")
	if got := doc.Find("[data-testid=clinical-caution]").Text(); !strings.Contains(got, "A negative bedside test does not clear a bird") {
		t.Errorf("disease-test form cautions %q, want the avian influenza caution", got)
	}
}

func TestMedicationsDue_PatientsPage(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	_, doc := a.get("/patients")
	if doc.Find("[data-testid=meds-due-none]").Length() != 1 {
		t.Error("no empty-list message without medications")
	}
	p := a.clinAdmit("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	a.get(clinicalPath(p, records.KindMedication) + "/new")
	form := clinicalForms()[records.KindMedication]
	form.Set("every_hours", "12")
	resp, _ := a.post(clinicalPath(p, records.KindMedication), form)
	wantStatus(t, resp, http.StatusSeeOther)
	_, doc = a.get("/patients")
	due := doc.Find("[data-testid=meds-due] li")
	if due.Length() != 1 {
		t.Fatalf("%d medications due, want 1", due.Length())
	}
	text := due.Text()
	for _, want := range []string{p.CaseNumber, "meloxicam oral suspension", "0.5 mg/kg PO", "08:00, 20:00"} {
		if !strings.Contains(text, want) {
			t.Errorf("due list %q does not show %q", text, want)
		}
	}
}
