package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"aloft/assess"
)

const (
	speciesSynopsis     = "species list [--json] | species show NAME [--json]"
	speciesListSynopsis = "species list [--group GROUP] [--json]"
	speciesShowSynopsis = "species show NAME [--json]   (NAME: scientific or common name, any case)"
	speciesAdvisory     = "Reference values for a healthy adult, for advice only: the veterinarian and the licensed\n" +
		"rehabilitator decide, under local law and the permit's conditions (see CAUTIONS.md).\n"
)

// cmdSpecies lists or shows the species reference.
func cmdSpecies(ctx context.Context, args []string, cio cmdIO) int {
	if len(args) == 0 {
		return usageErr(cio, "species", "missing subcommand: usage: aloft %s", speciesSynopsis)
	}
	switch args[0] {
	case "list":
		return speciesList(args[1:], cio)
	case "show":
		return speciesShow(args[1:], cio)
	case "-h", "--help", "-help", "help":
		fmt.Fprintf(cio.Stdout, "usage: aloft %s\n", speciesSynopsis)
		return exitOK
	}
	return usageErr(cio, "species", "unknown subcommand %q: usage: aloft %s", args[0], speciesSynopsis)
}

func speciesList(args []string, cio cmdIO) int {
	fs := newFlags("species list", speciesListSynopsis, cio)
	asJSON := fs.Bool("json", false, "print a JSON array, one object per species, with the source of every value")
	group := fs.String("group", "", "only this group, e.g. raptor, owl, songbird (see the group column)")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if fs.NArg() > 0 {
		return usageErr(cio, "species list", "unexpected argument %q", fs.Arg(0))
	}
	if *group != "" && !assess.Group(*group).Valid() {
		return usageErr(cio, "species list", "unknown group %q (one of: %s)", *group, speciesGroupNames())
	}
	t, err := assess.LoadSpecies()
	if err != nil {
		return failErr(cio, "species list", err)
	}
	var ss []*assess.Species
	for _, s := range t.All() {
		if *group == "" || s.Group == assess.Group(*group) {
			ss = append(ss, s)
		}
	}
	if *asJSON {
		return speciesWriteJSON(cio, "species list", ss)
	}
	writeSpeciesTable(cio.Stdout, ss)
	return exitOK
}

func speciesGroupNames() string {
	var gs []string
	for _, g := range assess.Groups {
		gs = append(gs, string(g))
	}
	return strings.Join(gs, ", ")
}

func writeSpeciesTable(w io.Writer, ss []*assess.Species) {
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "COMMON NAME\tSCIENTIFIC NAME\tGROUP\tMASS g\tSPAN mm\tAREA cm²\tLAUNCH")
	for _, s := range ss {
		est := ""
		if s.SpanAreaEstimated {
			est = " (est.)"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s%s\t%s\t%s\n", s.CommonName, s.ScientificName, s.Group,
			spNum(s.MassG.Pooled), spNum(s.SpanMM), est, spNum(s.AreaCM2), s.LaunchMode)
	}
	tw.Flush()
	fmt.Fprintf(w, "\n%d species. Span and area marked (est.) are estimated, not measured.\n%s", len(ss), speciesAdvisory)
}

func speciesShow(args []string, cio cmdIO) int {
	fs := newFlags("species show", speciesShowSynopsis, cio)
	asJSON := fs.Bool("json", false, "print one JSON object with the source of every value")
	// The name may be several words, and flags may follow it.
	var flags, words []string
	for _, a := range args {
		if strings.HasPrefix(a, "-") {
			flags = append(flags, a)
		} else {
			words = append(words, a)
		}
	}
	if code, ok := parseFlags(fs, flags, cio); !ok {
		return code
	}
	name := strings.Join(words, " ")
	if name == "" {
		return usageErr(cio, "species show", "missing NAME: usage: aloft %s", speciesShowSynopsis)
	}
	t, err := assess.LoadSpecies()
	if err != nil {
		return failErr(cio, "species show", err)
	}
	s, err := t.Find(name)
	if errors.Is(err, assess.ErrUnknownSpecies) {
		return failErr(cio, "species show", unknownSpeciesErr(t, name))
	}
	if err != nil {
		return failErr(cio, "species show", err)
	}
	if *asJSON {
		return speciesWriteJSON(cio, "species show", s)
	}
	writeSpeciesDetail(cio.Stdout, s)
	return exitOK
}

// unknownSpeciesErr names the closest matches, if any.
func unknownSpeciesErr(t *assess.SpeciesTable, name string) error {
	var near []string
	for _, s := range t.Search(name, 5) {
		near = append(near, s.CommonName)
	}
	if len(near) == 0 {
		return fmt.Errorf("no species named %q (try aloft species list)", name)
	}
	return fmt.Errorf("no species named %q; did you mean: %s?", name, strings.Join(near, ", "))
}

func speciesWriteJSON(cio cmdIO, cmd string, v any) int {
	enc := json.NewEncoder(cio.Stdout)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return failErr(cio, cmd, err)
	}
	return exitOK
}

// speciesLine is one value of `species show` and the key of its source.
type speciesLine struct{ label, value, source string }

func writeSpeciesDetail(w io.Writer, s *assess.Species) {
	fmt.Fprintf(w, "%s (%s)\n", s.CommonName, s.ScientificName)
	if len(s.OtherNames) > 0 {
		fmt.Fprintf(w, "also: %s\n", strings.Join(s.OtherNames, "; "))
	}
	fmt.Fprintln(w)
	var cites []assess.SourceRef
	ref := func(key string) string {
		src, ok := s.Sources[key]
		if !ok {
			return ""
		}
		i := slices.IndexFunc(cites, func(c assess.SourceRef) bool { return c == src })
		if i < 0 {
			cites = append(cites, src)
			i = len(cites) - 1
		}
		return fmt.Sprintf("[%d %s]", i+1, src.Provenance)
	}
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	for _, l := range speciesLines(s) {
		fmt.Fprintf(tw, "%s\t%s\t%s\n", l.label, l.value, ref(l.source))
	}
	tw.Flush()
	fmt.Fprintln(w, "\nSources:")
	for i, c := range cites {
		note := ""
		if c.Note != "" {
			note = " — " + c.Note
		}
		fmt.Fprintf(w, "[%d] %s: %s%s\n", i+1, c.Provenance, c.Citation, note)
	}
	fmt.Fprintf(w, "\n%s", speciesAdvisory)
}

func speciesLines(s *assess.Species) []speciesLine {
	flo, fhi := s.MassRangeG(assess.SexFemale)
	mlo, mhi := s.MassRangeG(assess.SexMale)
	ulo, uhi := s.MassRangeG(assess.SexUnknown)
	est := "measured"
	if s.SpanAreaEstimated {
		est = "estimated"
	}
	ls := []speciesLine{
		{"group", fmt.Sprintf("%s (%s)", s.Group, s.Group.Label()), "group"},
		{"family, order", s.Family + ", " + s.Order, "family"},
		{"passerine", spYesNo(s.Passerine), "passerine"},
		{"migrant", fmt.Sprintf("%s (AVONET migration %d)", spYesNo(s.Migrant), s.Migration), "migrant"},
		{"mass, sexes pooled", spNum(s.MassG.Pooled) + " g", "mass_g.pooled"},
	}
	if s.MassG.Female != nil {
		ls = append(ls, speciesLine{"mass, female", spNum(*s.MassG.Female) + " g", "mass_g.female"},
			speciesLine{"mass, male", spNum(*s.MassG.Male) + " g", "mass_g.male"})
	}
	ls = append(ls,
		speciesLine{"mass range", fmt.Sprintf("female %s–%s g, male %s–%s g, unknown sex %s–%s g",
			spNum(flo), spNum(fhi), spNum(mlo), spNum(mhi), spNum(ulo), spNum(uhi)), "mass_range_g"},
		speciesLine{"wing chord (unflattened)", spNum(s.WingChordMM) + " mm", "wing_chord_mm"},
		speciesLine{"wingspan", spNum(s.SpanMM) + " mm (" + est + ")", "span_mm"},
		speciesLine{"wing area", spNum(s.AreaCM2) + " cm² (" + est + ")", "area_cm2"},
		speciesLine{"normal launch", string(s.LaunchMode), "launch_mode"},
		speciesLine{"trials without a reason", spModeList(s.Group.SafeTrialModes()) + " (common practice, PRACTICE.md)", ""},
		speciesLine{"flight style", string(s.FlightStyle), "flight_style"},
		speciesLine{"primaries, secondaries, rectrices", fmt.Sprintf("%d, %d, %d", s.Primaries, s.Secondaries, s.Rectrices), "primaries"},
	)
	if e, ok := assess.Enclosure(s.EnclosureClass); ok {
		ls = append(ls, speciesLine{"enclosure", fmt.Sprintf("%s: %s ft (%s×%s×%s m)", e.Label, e.Feet,
			spNum(e.LengthM), spNum(e.WidthM), spNum(e.HeightM)), "enclosure_class"})
	}
	ls = append(ls, speciesLine{"unbroken passes", spOptInt(s.MinPasses, "not set: the centre decides"), "min_passes"})
	if s.MinPrereleaseDays != nil {
		ls = append(ls, speciesLine{"pre-release housing", strconv.Itoa(*s.MinPrereleaseDays) + " days at least", "min_prerelease_days"})
	}
	if s.WaterproofDays != nil {
		ls = append(ls, speciesLine{"waterproof", strconv.Itoa(*s.WaterproofDays) + " consecutive days", "waterproof_days"})
	}
	if s.ReleaseMinMassG != nil {
		ls = append(ls, speciesLine{"release mass", "at least " + spNum(*s.ReleaseMinMassG) + " g", "release_min_mass_g"})
	}
	if s.ReleaseGuide != "" {
		ls = append(ls, speciesLine{"release guide", s.ReleaseGuide, "release_guide"})
	}
	return append(ls,
		speciesLine{"expected power margin", spOptFloat(s.ExpectedMargin, "default allometry"), "expected_margin"},
		speciesLine{"flight-muscle fraction", spOptFloat(s.FlightMuscleFraction, "unknown"), "flight_muscle_fraction"})
}

func spYesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

func spNum(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

func spOptInt(p *int, none string) string {
	if p == nil {
		return none
	}
	return strconv.Itoa(*p)
}

func spOptFloat(p *float64, none string) string {
	if p == nil {
		return none
	}
	return spNum(*p)
}

func spModeList(ms []assess.LaunchMode) string {
	var ss []string
	for _, m := range ms {
		ss = append(ss, string(m))
	}
	return strings.Join(ss, ", ")
}
