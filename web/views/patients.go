package views

import (
	"fmt"
	"strconv"
	"time"

	"aloft/assess"
	"aloft/records"
)

// PatientsPage is the patient list.
type PatientsPage struct {
	Query    string
	Status   string
	Patients []records.Patient
	// Extra holds sections other features add above the list (e.g. today's
	// medications); each is rendered in order.
	Extra []Section
}

// IntakeForm is the admission form, holding exactly what the person typed.
type IntakeForm struct {
	Species, AgeClass, Sex, FoundDate, FoundPlace, FoundLat, FoundLon string
	FinderName, FinderContact, Reason, IntakeCondition, IntakeMassG   string
	MassNote                                                          string
	ConfirmMass                                                       bool
	NeedsConfirm                                                      bool // the mass is implausible for the species: ask for a reason
	SpeciesOptions                                                    []SpeciesOption
	Errors                                                            assess.ValidationErrors
}

// SpeciesOption is one entry of the species datalist.
type SpeciesOption struct{ Value, Label string }

// PatientPage is one patient's page.
type PatientPage struct {
	Patient  records.Patient
	Species  *SpeciesRef
	Audit    []records.AuditEntry
	Sections []Section // feature sections, rendered in order after the details
}

// SpeciesRef is the species' reference values as shown on the patient page.
type SpeciesRef struct {
	Common, Scientific string
	Rows               []RefRow
}

// RefRow is one reference value with its unit and source.
type RefRow struct{ Label, Value, Source string }

// Section is a titled block of a page that a feature renders.
type Section struct {
	ID    string
	Title string
	Body  templComponent
}

func fmtDate(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.Local().Format("2006-01-02")
}

func fmtTime(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.Local().Format("2006-01-02 15:04")
}

// Grams formats a mass in grams with a unit.
func Grams(g float64) string { return strconv.FormatFloat(g, 'f', -1, 64) + " g" }

func statusLabel(d assess.Disposition) string {
	switch d {
	case assess.DispInCare, "":
		return "in care"
	case assess.DispDeadOnArrival:
		return "dead on arrival"
	}
	return string(d)
}

func coords(p records.Patient) string {
	if p.FoundLat == nil || p.FoundLon == nil {
		return ""
	}
	return fmt.Sprintf("%.5f, %.5f", *p.FoundLat, *p.FoundLon)
}

func speciesName(p records.Patient) string {
	if p.SpeciesCommon != "" {
		return p.SpeciesCommon
	}
	return p.SpeciesScientific
}

func patientURL(p records.Patient) string { return "/patients/" + p.CaseNumber }
