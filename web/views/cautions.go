package views

import "strings"

// CautionSection is one heading of CAUTIONS.md with its bullet points.
type CautionSection struct {
	Heading string
	Items   []string
}

// ParseCautions reads CAUTIONS.md's shape: "## " headings, "- " bullets
// (continuation lines are joined), everything else ignored.
func ParseCautions(md string) []CautionSection {
	var out []CautionSection
	for _, line := range strings.Split(md, "\n") {
		t := strings.TrimSpace(line)
		switch {
		case strings.HasPrefix(t, "## "):
			out = append(out, CautionSection{Heading: strings.TrimSpace(t[3:])})
		case strings.HasPrefix(t, "- ") && len(out) > 0:
			sec := &out[len(out)-1]
			sec.Items = append(sec.Items, strings.ReplaceAll(strings.TrimSpace(t[2:]), "**", ""))
		case t != "" && len(out) > 0 && len(out[len(out)-1].Items) > 0 && !strings.HasPrefix(t, "#"):
			items := out[len(out)-1].Items
			items[len(items)-1] += " " + t
		}
	}
	return out
}
