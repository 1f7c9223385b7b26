package reports

import (
	"fmt"
	"io"
	"slices"
	"strings"
	"time"

	"aloft/records"
)

// SignOffSheetInput is what a sign-off sheet shows: one frozen report
// version with its sign-offs, its patient and the centre.
type SignOffSheetInput struct {
	Centre  records.Centre
	Patient records.Patient
	Version records.ReportVersion // with its SignOffs
	// GeneratedAt is when the sheet was made from the sign-off records.
	GeneratedAt time.Time
}

// RenderSignOffSheet writes the one-page sign-off sheet of a frozen report
// version as a PDF: the version, the SHA-256 of its bytes in full, and each
// sign-off (who, in which role, when, the hash signed and whether it is the
// report's, the comment), with the roles still to sign. Like the report, the
// page says "Advisory" and that the licensed rehabilitator and the
// veterinarian decide.
func RenderSignOffSheet(w io.Writer, in SignOffSheetInput, opts Options) error {
	d, err := newDoc(opts, in.GeneratedAt)
	if err != nil {
		return err
	}
	v := in.Version
	d.header = [2]string{in.Centre.Name + " · Sign-off sheet", fmt.Sprintf("Case %s · report version %d", in.Patient.CaseNumber, v.Version)}
	d.footerNote = "Sign-off sheet generated " + d.dateTime(in.GeneratedAt) + " from the sign-off records."
	d.meta(fmt.Sprintf("Sign-off sheet, case %s, report version %d", in.Patient.CaseNumber, v.Version), in.Centre.Name)
	d.pdf.AddPage()
	d.font("B", 18)
	d.colour(colNavy)
	d.pdf.SetX(marginSide)
	d.pdf.CellFormat(d.contentW(), 9, "Sign-off sheet", "", 1, "L", false, 0, "")
	d.para(fmt.Sprintf("Pre-release flight assessment of case %s, version %d: who reviewed it and signed it off, on its hash.",
		in.Patient.CaseNumber, v.Version), "", sizeBody, lineBody, colGrey)
	d.space(3)
	site := v.Site.Label + ", " + fixed(v.Site.ElevationM, 0, "m")
	if v.Site.TempC != nil {
		site += ", " + asRecorded(*v.Site.TempC, "°C")
	}
	frozenBy := v.CreatedByName
	if frozenBy == "" {
		frozenBy = "—"
	}
	d.facts([][2]string{
		{"Centre", in.Centre.Name},
		{"Case number", in.Patient.CaseNumber},
		{"Species", fmt.Sprintf("%s (%s)", speciesName(in.Patient), in.Patient.SpeciesScientific)},
		{"Report version", itoa(v.Version)},
		{"Frozen", d.dateTime(v.CreatedAt)},
		{"Frozen by", frozenBy},
		{"Release site", site},
		{"Report file", fmt.Sprintf("%d bytes, %s pages", v.SizeBytes, v.PageSize)},
		{"Times are in", d.zoneWords(v.CreatedAt)},
	})
	d.hashBox("SHA-256 of the report file", v.SHA256)
	d.note("To check a copy of the report, compute the SHA-256 of the PDF file (sha256sum FILE on Linux, shasum -a 256 FILE on macOS, " +
		"certutil -hashfile FILE SHA256 on Windows) and compare it with the hash above, character by character. A sign-off covers " +
		"exactly the file with the hash it names.")
	d.subsection("Sign-offs")
	d.table([]column{{"Role", 0.17, "L"}, {"Name", 0.17, "L"}, {"Signed", 0.16, "L"}, {"Hash signed", 0.28, "L"}, {"Comment", 0.22, "L"}},
		d.signOffRows(v), sizeSmall)
	d.body("Each sign-off was made in Aloft by the person named, after entering their password again. It records their review of " +
		"this version; the decision rests with the licensed rehabilitator and the veterinarian, under local law and the conditions " +
		"of the centre's permits. Aloft only advises.")
	return d.output(w)
}

// hashBox prints a hash in full in a monospaced face on a light band.
func (d *doc) hashBox(label, hash string) {
	d.need(16)
	y := d.y()
	d.fill(colHead)
	d.pdf.Rect(marginSide, y, d.contentW(), 13, "F")
	d.font("B", 7.5)
	d.colour(colNavy)
	d.pdf.Text(marginSide+3, y+4, label)
	d.mono("B", 10.5)
	d.colour(colText)
	d.pdf.Text(marginSide+3, y+10, hash)
	d.pdf.SetY(y + 16)
}

// signOffRows lists the sign-offs, then a row for each sign-off role that
// has not signed yet.
func (d *doc) signOffRows(v records.ReportVersion) [][]cell {
	var rows [][]cell
	for _, so := range v.SignOffs {
		match := line{text: "matches the report", size: 7, style: "B"}
		if so.SHA256 != v.SHA256 {
			match.text = "DIFFERS FROM THE REPORT"
		}
		hash := cell{lines: []line{{text: splitHash(so.SHA256), mono: true, size: 6.5}, match}}
		rows = append(rows, []cell{txt(capital(roleWords(string(so.Role)))), txt(so.UserName), txt(d.dateTime(so.At)), hash, txt(so.Comment)})
	}
	for _, role := range records.SignOffRoles {
		if !slices.ContainsFunc(v.SignOffs, func(so records.SignOff) bool { return so.Role == role }) {
			rows = append(rows, []cell{txt(capital(roleWords(string(role)))), {lines: []line{{text: "not signed yet", style: "I", grey: true}}},
				txt("—"), txt("—"), txt("")})
		}
	}
	return rows
}

// splitHash breaks a 64-character hash into two lines of 32.
func splitHash(h string) string {
	if len(h) <= 32 {
		return h
	}
	return h[:32] + "\n" + h[32:]
}

// capital upper-cases the first letter of s.
func capital(s string) string {
	if s == "" {
		return s
	}
	r := []rune(s)
	return strings.ToUpper(string(r[0])) + string(r[1:])
}
