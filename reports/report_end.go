package reports

import (
	"fmt"
	"strings"
)

// cautionSection is one "## " heading of CAUTIONS.md with its bullets.
type cautionSection struct {
	heading string
	items   []string
}

// parseCautions reads CAUTIONS.md's shape: "## " headings and "- " bullets
// (continuation lines joined); other lines are left out.
func parseCautions(md string) []cautionSection {
	var out []cautionSection
	for _, raw := range strings.Split(md, "\n") {
		t := strings.TrimSpace(raw)
		switch {
		case strings.HasPrefix(t, "## "):
			out = append(out, cautionSection{heading: strings.TrimSpace(t[3:])})
		case strings.HasPrefix(t, "- ") && len(out) > 0:
			sec := &out[len(out)-1]
			sec.items = append(sec.items, strings.ReplaceAll(strings.TrimSpace(t[2:]), "**", ""))
		case t != "" && !strings.HasPrefix(t, "#") && len(out) > 0 && len(out[len(out)-1].items) > 0:
			items := out[len(out)-1].items
			items[len(items)-1] += " " + t
		}
	}
	return out
}

// cautions prints the cautions of this case, then every caution of
// CAUTIONS.md.
func (r *report) cautions() error {
	d, a := r.doc, r.in.Assessment
	d.section("Cautions", 60)
	if len(a.Cautions) > 0 {
		d.subsection("For this case")
		for _, c := range a.Cautions {
			d.bullets([]string{c.Text}, sizeBody, lineBody)
			if c.Source != "" {
				d.pdf.SetX(marginSide + 5)
				d.font("", 7.5)
				d.colour(colGrey)
				d.pdf.MultiCell(d.contentW()-5, 3.3, "Source: "+c.Source, "", "L", false)
				d.colour(colText)
				d.space(0.8)
			}
		}
	}
	secs := parseCautions(r.in.Cautions)
	if len(secs) == 0 {
		d.body("The centre's general cautions were not supplied with this report: read CAUTIONS.md in Aloft.")
		return nil
	}
	for _, sec := range secs {
		d.subsection(sec.heading)
		d.bullets(sec.items, sizeSmall+0.5, lineSmall+0.2)
	}
	return nil
}

// signatures is the block for signatures on paper: one box each for the
// veterinarian and the licensed rehabilitator.
func (r *report) signatures() error {
	d, in := r.doc, r.in
	d.section("Review and signatures", signatureBoxH+30)
	if in.Version == 0 {
		d.body("This is a working copy, not a frozen version: sign a version generated for review in Aloft, whose hash is on its sign-off sheet.")
	} else {
		d.body(fmt.Sprintf("Electronic sign-offs are made in Aloft on this version's SHA-256 hash and listed on its sign-off sheet. "+
			"To sign on paper, each reviewer completes a box below. The decision rests with the licensed rehabilitator and the "+
			"veterinarian, under local law and the conditions of the centre's permits; this report only advises. Version %d.", in.Version))
	}
	d.space(2)
	y := d.y()
	gap := 6.0
	w := (d.contentW() - gap) / 2
	reviewed := "Case " + in.Patient.CaseNumber
	if in.Version > 0 {
		reviewed += fmt.Sprintf(", version %d", in.Version)
	}
	for i, role := range []string{"Veterinarian", "Licensed rehabilitator"} {
		d.signatureBox(marginSide+float64(i)*(w+gap), y, w, role, reviewed)
	}
	d.pdf.SetY(y + signatureBoxH + 3)
	return nil
}

// signatureBoxH is the height of a signature box, mm.
const signatureBoxH = 78.0

// signatureBox draws one reviewer's box: name, signature, date, the version
// reviewed and space for remarks and the decision.
func (d *doc) signatureBox(x, y, w float64, role, reviewed string) {
	p := d.pdf
	p.SetDrawColor(colRule[0], colRule[1], colRule[2])
	p.SetLineWidth(0.3)
	p.Rect(x, y, w, signatureBoxH, "D")
	d.fill(colHead)
	p.Rect(x, y, w, 7, "F")
	d.font("B", 9.5)
	d.colour(colNavy)
	p.Text(x+2.5, y+4.9, role)
	d.colour(colText)
	ly := y + 15.0
	field := func(label, value string) {
		d.font("", 7.5)
		d.colour(colGrey)
		p.Text(x+2.5, ly, label)
		d.colour(colText)
		if value != "" {
			d.font("", sizeBody)
			p.Text(x+26, ly-0.5, value)
		} else {
			p.SetDrawColor(colRule[0], colRule[1], colRule[2])
			p.SetLineWidth(0.2)
			p.Line(x+26, ly+0.5, x+w-3, ly+0.5)
		}
		ly += 9
	}
	field("Name", "")
	field("Signature", "")
	field("Date", "")
	field("Reviewed", reviewed)
	d.font("", 7.5)
	d.colour(colGrey)
	p.Text(x+2.5, ly, "Decision and remarks")
	d.colour(colText)
	p.SetDrawColor(colRule[0], colRule[1], colRule[2])
	for ry := ly + 7; ry < y+signatureBoxH-3; ry += 7 {
		p.Line(x+2.5, ry, x+w-3, ry)
	}
}
