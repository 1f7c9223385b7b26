package reports

import (
	"fmt"
	"strings"

	"aloft/assess"
)

// criteria is the section of every criterion that applies to the species'
// group: its status in words, the evidence with dates and units, the rule
// applied and where it comes from, and the reason.
func (r *report) criteria() error {
	d, a := r.doc, r.in.Assessment
	d.pdf.AddPage()
	d.section("Criteria", 60)
	d.body(criteriaCount(a.Criteria) + " Core criteria (marked “core”) must all be assessed for any outcome but " +
		"“too little evidence”. Evidence older than the staleness limit is marked stale and cannot support the top outcome.")
	var rows [][]cell
	for _, c := range a.Criteria {
		rows = append(rows, r.criterionRow(c))
	}
	d.table([]column{{"Criterion", 0.24, "L"}, {"Status", 0.15, "L"}, {"Reason, evidence and rule", 0.61, "L"}}, rows, 8.5)
	if len(a.Notes) > 0 {
		d.subsection("Notes from the assessment")
		d.bullets(readableNotes(a.Notes), sizeSmall, lineSmall)
	}
	return nil
}

// criteriaCount summarises the statuses in a sentence.
func criteriaCount(cs []assess.Criterion) string {
	n := map[assess.Status]int{}
	for _, c := range cs {
		n[c.Status]++
	}
	return fmt.Sprintf("%d criteria apply to this species' group: %d met, %d borderline, %d not met, %d not assessed.",
		len(cs), n[assess.StatusMet], n[assess.StatusBorderline], n[assess.StatusUnmet], n[assess.StatusNotAssessed])
}

func (r *report) criterionRow(c assess.Criterion) []cell {
	title := cell{lines: []line{{text: c.Title, style: "B"}}}
	if c.Core {
		title.lines = append(title.lines, line{text: "core", size: 7, grey: true})
	}
	st := cell{badge: &badgeSpec{statusWord(c.Status), statusTone(c.Status)}}
	if c.Stale {
		st.lines = append(st.lines, line{text: "stale evidence", size: 7, style: "B"})
	}
	if c.AsOf != nil {
		st.lines = append(st.lines, line{text: "as of " + r.date(*c.AsOf), size: 7, grey: true})
	}
	if c.Refer {
		st.lines = append(st.lines, line{text: "refer to the veterinarian", size: 7, style: "B"})
	}
	body := cell{lines: []line{{text: c.Reason}}}
	if ev := r.evidenceWords(c.Evidence); ev != "" {
		body.lines = append(body.lines, line{text: "Evidence: " + ev, size: 7.5})
	}
	for _, f := range c.Findings {
		body.lines = append(body.lines, line{text: "Finding: " + f, size: 7.5})
	}
	if c.Threshold != "" {
		body.lines = append(body.lines, line{text: "Rule: " + c.Threshold, size: 7.5, grey: true})
	}
	if b := basisWords(c.Provenance); b != "" {
		body.lines = append(body.lines, line{text: "Basis: " + b, size: 7.5, grey: true})
	}
	return []cell{title, st, body}
}

// evidenceWords joins a criterion's evidence: name, value with unit, date.
func (r *report) evidenceWords(ev []assess.Evidence) string {
	parts := make([]string, 0, len(ev))
	for _, e := range ev {
		s := e.Name + " " + e.Text
		if e.At != nil {
			s += " (" + r.date(*e.At) + ")"
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, "; ")
}
