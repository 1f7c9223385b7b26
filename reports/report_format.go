package reports

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"aloft/assess"
	"aloft/records"
)

func itoa(n int) string { return strconv.Itoa(n) }

// fixed formats x with the given decimals and a unit ("" for none).
func fixed(x float64, decimals int, unit string) string {
	s := strconv.FormatFloat(x, 'f', decimals, 64)
	if s == "-0" || strings.HasPrefix(s, "-0.") && strings.Trim(s[1:], "0.") == "" {
		s = s[1:]
	}
	if unit == "" {
		return s
	}
	return s + " " + unit
}

// sig3 formats x to about three significant figures, never in exponent
// form, with a unit.
func sig3(x float64, unit string) string {
	a := math.Abs(x)
	switch {
	case a >= 100:
		return fixed(x, 0, unit)
	case a >= 10:
		return fixed(x, 1, unit)
	case a >= 1:
		return fixed(x, 2, unit)
	}
	return fixed(x, 3, unit)
}

// asRecorded formats a recorded number as typed (shortest form), with a unit.
func asRecorded(x float64, unit string) string {
	s := strconv.FormatFloat(x, 'f', -1, 64)
	if unit == "" {
		return s
	}
	return s + " " + unit
}

// Speed formats a speed in m/s as the report prints it: one decimal.
func Speed(ms float64) string { return fixed(ms, 1, "m/s") }

// date formats an instant's calendar day in the report's time zone.
func (d *doc) date(t time.Time) string {
	if t.IsZero() {
		return "—"
	}
	return t.In(d.loc).Format("2006-01-02")
}

// dateTime formats an instant to the minute in the report's time zone
// (named once, on the first page: zoneWords).
func (d *doc) dateTime(t time.Time) string {
	if t.IsZero() {
		return "—"
	}
	return t.In(d.loc).Format("2006-01-02 15:04")
}

// zoneWords names the time zone of every time in the document, as of t.
func (d *doc) zoneWords(t time.Time) string {
	name, off := t.In(d.loc).Zone()
	if off == 0 && (name == "UTC" || name == "GMT") {
		return name
	}
	sign := "+"
	if off < 0 {
		sign, off = "−", -off
	}
	return fmt.Sprintf("%s (UTC%s%02d:%02d)", name, sign, off/3600, off%3600/60)
}

func (d *doc) datePtr(t *time.Time) string {
	if t == nil {
		return "—"
	}
	return d.date(*t)
}

// provenanceWords is a provenance in the project's words.
func provenanceWords(p assess.Provenance) string {
	switch p {
	case assess.ProvPublished:
		return "published"
	case assess.ProvDerived:
		return "derived"
	case assess.ProvCommonPractice:
		return "common practice"
	case assess.ProvProjectDefault:
		return "Aloft default"
	case assess.ProvCentreSetting:
		return "centre setting"
	case assess.ProvFromMemory:
		return "from memory, not checked against the source"
	case "":
		return "—"
	}
	return string(p)
}

// basisWords is a criterion's basis: its provenance and source.
func basisWords(b assess.Basis) string {
	if b.Kind == "" && b.Source == "" {
		return ""
	}
	s := provenanceWords(b.Kind)
	if b.Source != "" {
		s += ": " + b.Source
	}
	return s
}

func speciesName(p records.Patient) string {
	if p.SpeciesCommon != "" {
		return p.SpeciesCommon
	}
	return p.SpeciesScientific
}

// sexWords is a sex in words.
func sexWords(s assess.Sex) string {
	if s == "" || s == assess.SexUnknown {
		return "unknown"
	}
	return string(s)
}

// dispositionWords is a patient's status in words.
func dispositionWords(p records.Patient) string {
	switch p.Status {
	case assess.DispInCare, "":
		return "in care"
	case assess.DispDeadOnArrival:
		return "dead on arrival, " + p.StatusDate
	}
	s := string(p.Status)
	if p.StatusDate != "" {
		s += " on " + p.StatusDate
	}
	return s
}

// fedWords says whether a weigh-in was before or after feeding.
func fedWords(f assess.FedState) string {
	switch f {
	case assess.FedBefore:
		return "before feeding"
	case assess.FedAfter:
		return "after feeding"
	}
	return "feeding not noted"
}

// siteWords describes a site: elevation, temperature (measured or the
// standard atmosphere's) and air density.
func siteWords(s assess.SiteUsed) string {
	t := "standard-atmosphere temperature " + fixed(15-0.0065*s.ElevationM, 1, "°C")
	if s.TempC != nil {
		t = "air " + asRecorded(*s.TempC, "°C")
	}
	return fmt.Sprintf("%s elevation, %s; air density %s", fixed(s.ElevationM, 0, "m"), t, fixed(s.AirDensityKgM3, 4, "kg/m³"))
}

// yesNo is a flag in words.
func yesNo(b bool, yes, no string) string {
	if b {
		return yes
	}
	return no
}

func optFloat(p *float64, unit string) string {
	if p == nil {
		return "—"
	}
	return asRecorded(*p, unit)
}

func optInt(p *int, unit string) string {
	if p == nil {
		return "—"
	}
	if unit == "" {
		return itoa(*p)
	}
	return itoa(*p) + " " + unit
}
