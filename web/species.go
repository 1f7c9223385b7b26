package web

import (
	"fmt"
	"sort"

	"aloft/assess"
	"aloft/web/views"
)

// speciesRef builds the patient page's table of a species' reference values
// for a patient's sex, each with its unit and source.
func speciesRef(sp *assess.Species, sex assess.Sex) *views.SpeciesRef {
	ref := &views.SpeciesRef{Common: sp.CommonName, Scientific: sp.ScientificName}
	src := func(keys ...string) string {
		for _, k := range keys {
			if s, ok := sp.Sources[k]; ok {
				return sourceLabel(s)
			}
		}
		return ""
	}
	lo, hi := sp.MassRangeG(sex)
	r := sp.Reference(sex)
	massKey := "mass_g.pooled"
	if sex == assess.SexFemale && sp.MassG.Female != nil {
		massKey = "mass_g.female"
	} else if sex == assess.SexMale && sp.MassG.Male != nil {
		massKey = "mass_g.male"
	}
	rangeKey := "mass_range_g.unknown"
	if sex == assess.SexFemale || sex == assess.SexMale {
		rangeKey = "mass_range_g." + string(sex)
	}
	add := func(label, value, source string) {
		ref.Rows = append(ref.Rows, views.RefRow{Label: label, Value: value, Source: source})
	}
	add("Reference mass ("+string(sex)+")", fmt.Sprintf("%.0f g", r.MassKg*1000), src(massKey, "mass_g.pooled", "mass_g"))
	add("Typical mass range ("+string(sex)+")", fmt.Sprintf("%.0f–%.0f g", lo, hi), src(rangeKey, "mass_range_g"))
	est := ""
	if sp.SpanAreaEstimated {
		est = " (estimated)"
	}
	add("Wingspan", fmt.Sprintf("%.0f mm%s", sp.SpanMM, est), src("span_mm"))
	add("Wing area", fmt.Sprintf("%.0f cm²%s", sp.AreaCM2, est), src("area_cm2"))
	if sp.SpanMM > 0 && sp.AreaCM2 > 0 {
		b := sp.SpanMM / 1000
		add("Aspect ratio", fmt.Sprintf("%.2f", b*b/(sp.AreaCM2/1e4)), "derived: span² / area")
		add("Wing loading", fmt.Sprintf("%.1f N/m²", r.MassKg*9.81/(sp.AreaCM2/1e4)), "derived: mass × g / area")
	}
	add("Wing chord (unflattened)", fmt.Sprintf("%.0f mm", sp.WingChordMM), src("wing_chord_mm"))
	add("Normal launch", string(sp.LaunchMode), src("launch_mode"))
	add("Group", sp.Group.Label(), src("group"))
	if sp.ReleaseMinMassG != nil {
		add("Release guide: lowest mass", fmt.Sprintf("%.0f g", *sp.ReleaseMinMassG), src("release_min_mass_g"))
	}
	return ref
}

func sourceLabel(s assess.SourceRef) string {
	out := s.Citation
	if s.Note != "" {
		out += " — " + s.Note
	}
	return fmt.Sprintf("[%s] %s", s.Provenance, out)
}

var _ = sort.Strings
