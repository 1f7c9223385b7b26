package web

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"aloft/assess"
	"aloft/web/views"
)

// condTimeLayout is the value format of a datetime-local field.
const condTimeLayout = "2006-01-02T15:04"

// condFuture is how far past the server's clock a record's time may lie
// (phones and the server disagree by a few minutes).
const condFuture = 10 * time.Minute

// condParser reads one form, collecting every field error.
type condParser struct {
	f    *views.CondForm
	errs assess.ValidationErrors
}

func (p *condParser) fail(e *assess.ValidationError) {
	if e != nil && p.errs.Field(e.Field) == "" {
		p.errs = append(p.errs, e)
	}
}

// ok reports whether field has no error yet.
func (p *condParser) ok(field string) bool { return p.errs.Field(field) == "" }

// merge adds a Validate error's fields, skipping fields already refused
// while parsing (their message says more).
func (p *condParser) merge(err error) {
	for _, e := range asValidation(err) {
		p.fail(e)
	}
}

func (p *condParser) float(name string) float64 {
	v, e := parseFloatField(name, p.f.V(name), false)
	p.fail(e)
	return v
}

func (p *condParser) optFloat(name string) *float64 {
	v, e := parseOptFloat(name, p.f.V(name))
	p.fail(e)
	return v
}

// count reads a whole number; empty is 0 unless required.
func (p *condParser) count(name string, required bool) int {
	v, e := parseIntField(name, p.f.V(name), !required)
	p.fail(e)
	return v
}

func (p *condParser) optInt(name string) *int {
	v, e := parseOptInt(name, p.f.V(name))
	p.fail(e)
	return v
}

func (p *condParser) text(name string) string { return strings.TrimSpace(p.f.V(name)) }

// at reads the record's date and time: required, not in the future, not
// before the day of admission.
func (p *condParser) at(s *Server, cx *condCtx) time.Time {
	raw := strings.TrimSpace(p.f.V("at"))
	if raw == "" {
		p.fail(&assess.ValidationError{Field: "at", Message: "enter the date and time of the observation"})
		return time.Time{}
	}
	t, err := time.ParseInLocation(condTimeLayout, raw, time.Local)
	if err != nil {
		t, err = time.ParseInLocation("2006-01-02T15:04:05", raw, time.Local)
	}
	if err != nil {
		p.fail(&assess.ValidationError{Field: "at", Value: raw, Message: "enter the date and time as YYYY-MM-DD and HH:MM"})
		return time.Time{}
	}
	admitted := cx.patient.AdmittedAt.Local()
	day := time.Date(admitted.Year(), admitted.Month(), admitted.Day(), 0, 0, 0, 0, time.Local)
	switch {
	case t.After(s.now().Add(condFuture)):
		p.fail(&assess.ValidationError{Field: "at", Value: raw, Message: "this time is in the future: check the date and the time"})
	case t.Before(day):
		p.fail(&assess.ValidationError{Field: "at", Value: raw, Message: fmt.Sprintf(
			"this is before the patient was admitted (%s): check the date", admitted.Format("2006-01-02 15:04"))})
	}
	return t
}

// confirm applies a "needs confirmation" finding: refused until the box
// confirmField is ticked and a reason is in note.
func (p *condParser) confirm(e *assess.ValidationError, field, confirmField, note string) {
	p.f.Confirm[field] = true
	switch {
	case !p.f.On(confirmField):
		p.fail(e)
	case note == "":
		p.fail(&assess.ValidationError{Field: "note", Message: "say why the value is right: it is far outside the species' reference"})
	}
}

func condNum(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

func condOptNum(p *float64) string {
	if p == nil {
		return ""
	}
	return condNum(*p)
}

func condOptInt(p *int) string {
	if p == nil {
		return ""
	}
	return strconv.Itoa(*p)
}

func condOnOff(b bool) string {
	if b {
		return "1"
	}
	return ""
}

func condAtValue(t time.Time) string { return t.Local().Format(condTimeLayout) }

// condDefaultFeathers serve a species missing from the table: ten
// primaries, twelve secondaries, twelve rectrices [common practice: typical
// of most non-passerines].
var condDefaultFeathers = assess.FeatherCounts{Primaries: 10, Secondaries: 12, RectricesPerSide: 6}

func condFeatherCounts(sp *assess.Species) assess.FeatherCounts {
	n := assess.FeatherCountsOf(sp)
	if n.Primaries == 0 {
		return condDefaultFeathers
	}
	return n
}

// condParseFeathers reads the feather map's selects; empty selects are intact.
func condParseFeathers(f *views.CondForm, n assess.FeatherCounts) *assess.FeatherMap {
	m := &assess.FeatherMap{}
	for _, t := range assess.FeatherTracts {
		fs := make([]assess.FeatherStatus, n.Count(t.Prefix))
		for i := range fs {
			v := f.V(fmt.Sprintf("%s%d", t.Prefix, i+1))
			if v == "" {
				v = string(assess.FeatherIntact)
			}
			fs[i] = assess.FeatherStatus(v)
		}
		*m.Tract(t.Prefix) = fs
	}
	return m
}

// condFeatherViews builds the feather map's rows from the form's values.
func condFeatherViews(f *views.CondForm, n assess.FeatherCounts) []views.FeatherTractView {
	var out []views.FeatherTractView
	for _, t := range assess.FeatherTracts {
		tv := views.FeatherTractView{Prefix: t.Prefix}
		bad := 0
		for i := 0; i < n.Count(t.Prefix); i++ {
			name := fmt.Sprintf("%s%d", t.Prefix, i+1)
			v := f.V(name)
			if v == "" {
				v = string(assess.FeatherIntact)
			}
			if v != string(assess.FeatherIntact) {
				bad++
			}
			tv.Open = tv.Open || f.Err(name) != ""
			tv.Feathers = append(tv.Feathers, views.FeatherCell{Name: name, Label: fmt.Sprintf("%s%d", t.Short, i+1), Value: v})
		}
		tv.Open = tv.Open || bad > 0 || f.Err(t.Prefix) != ""
		tv.Label = fmt.Sprintf("%s (%d): all intact", t.Label, n.Count(t.Prefix))
		if bad > 0 {
			tv.Label = fmt.Sprintf("%s (%d): %d not intact", t.Label, n.Count(t.Prefix), bad)
		}
		out = append(out, tv)
	}
	return out
}

func condSeconds(min float64) int { return int(math.Round(min * 60)) }
