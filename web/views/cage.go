package views

import (
	"strings"

	"aloft/assess"
)

// CagePage is the cage-side session page: one patient, or a group of
// patients housed and flown together. Without JavaScript it is a plain form
// (PostURL); with cage.js it becomes the tap counter, which keeps a draft on
// the phone and sends it to APIURL as JSON.
type CagePage struct {
	// Scope names the page's draft on the phone: the case number, or
	// "group:" and the sorted case numbers.
	Scope   string
	Birds   []CageBird // the patients covered, one for a single-bird session
	PostURL string     // the plain form's action
	APIURL  string     // the JSON endpoint cage.js posts to
	// BackURL is the page to return to after saving (the first patient's).
	BackURL string
	// LoginURL is the login page, returning here afterwards.
	LoginURL string
	Form     CageForm
	Errors   assess.ValidationErrors
	// Saved is the number of records the last plain-form save stored (shown
	// once after the redirect); 0 shows no notice.
	Saved int
	// AirTempNote says where the prefilled air temperature came from.
	AirTempNote string
	// EnclosureNote says where the prefilled enclosure came from.
	EnclosureNote string
	Cautions      []CautionSection
}

// Group reports whether the page covers several birds.
func (p CagePage) Group() bool { return len(p.Birds) > 1 }

// CaseList is the covered case numbers, comma-separated.
func (p CagePage) CaseList() string {
	cs := make([]string, len(p.Birds))
	for i, b := range p.Birds {
		cs[i] = b.Case
	}
	return strings.Join(cs, ",")
}

// Heading is the page's title line.
func (p CagePage) Heading() string {
	if p.Group() {
		return "Group flight session"
	}
	return "Flight session"
}

// CageBird is one patient a cage-side session covers, with the optional
// per-bird observations of a group session.
type CageBird struct {
	Case, Species, URL string
	Obs                CageBirdObs
}

// CageBirdObs is what was seen of one bird of a group, as typed.
type CageBirdObs struct {
	OpenMouth, TailBobbing, Asymmetry bool
	Droop, Notes                      string
}

// CageForm holds the session exactly as typed (numbers as text), by field.
type CageForm struct {
	Key, At                                          string
	Exercise, Enclosure, LengthM, AirTempC           string
	Passes, LongestRun, Landings, LandingsControlled string
	RecoveryS, Highest, Droop, Notes                 string
	OpenMouth, TailBobbing, Asymmetry                bool
}

// cageOpt is one choice of a row of big radio buttons.
type cageOpt struct{ Value, Label string }

// cageHeights are the highest-point choices, lowest first, with labels.
var cageHeights = []cageOpt{
	{string(assess.HeightFloor), "Floor"},
	{string(assess.HeightLowPerch), "Low perch"},
	{string(assess.HeightHighPerch), "High perch"},
	{string(assess.HeightCeiling), "Top / ceiling"},
}

// cageDroops are the wing-droop choices.
var cageDroops = []cageOpt{
	{string(assess.DroopNone), "No droop"},
	{string(assess.DroopLeft), "Droop left"},
	{string(assess.DroopRight), "Droop right"},
}

// cageExercises are the exercise choices.
var cageExercises = []cageOpt{
	{string(assess.ExerciseCage), "Flight cage"},
	{string(assess.ExerciseCreance), "Creance"},
	{string(assess.ExerciseFreeFlight), "Free flight"},
}

// birdField is the form name of a per-bird field of a group session.
func birdField(caseNo, field string) string { return "bird_" + caseNo + "_" + field }

// CageBirdField is birdField for the web package.
func CageBirdField(caseNo, field string) string { return birdField(caseNo, field) }

// CageLinks is the patient page's block leading to the cage-side page.
type CageLinks struct {
	Case string
	// Mates are the other in-care patients in the same enclosure; with
	// them a group session can be opened.
	Mates     []CageBird
	Enclosure string
}

// GroupURL is the group page of the patient and its enclosure mates.
func (l CageLinks) GroupURL() string {
	cs := []string{l.Case}
	for _, m := range l.Mates {
		cs = append(cs, m.Case)
	}
	return "/cage/group?cases=" + strings.Join(cs, ",")
}

func fieldMsg(errs assess.ValidationErrors, field string) string { return errs.Field(field) }

func droopOrNone(d string) string {
	if d == "" {
		return string(assess.DroopNone)
	}
	return d
}

// moreOpen opens the rarely used block when one of its fields has an error.
func moreOpen(pg CagePage) bool {
	for _, f := range []string{"exercise", "enclosure", "length_m", "notes"} {
		if pg.Errors.Field(f) != "" {
			return true
		}
	}
	return false
}
