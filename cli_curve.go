package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	"aloft/assess"
)

const curveSynopsis = "curve (--mass-g G --span-mm MM --area-cm2 A | --species NAME [--db FILE] [--sex female|male] [--mass-g G] [--span-mm MM] [--area-cm2 A]) [--elevation-m M] [--temp-c C] " +
	"[--passerine] [--migrant] [--fat-score N --fat-scale 0-8|0-5] [--muscle-score N] " +
	"[--params " + "pennycuick2008|pennycuick2013] [--json]"

// curveFlags are the flags of `aloft curve`, in the units staff use.
type curveFlags struct {
	massG, spanMM, areaCM2, elevationM float64
	tempC                              optFloat
	passerine, migrant                 bool
	fatScore, muscleScore              optInt
	fatScale, params                   string
	json                               bool
	species, sex, db                   string
}

// register declares the flags on fs.
func (f *curveFlags) register(fs *flag.FlagSet) {
	fs.Float64Var(&f.massG, "mass-g", 0, "mass now, `grams` (required)")
	fs.Float64Var(&f.spanMM, "span-mm", 0, "wingspan tip to tip, wings fully spread, `mm` (required)")
	fs.Float64Var(&f.areaCM2, "area-cm2", 0, "wing area, both wings and the body strip between them, `cm²` (required without a species)")
	fs.Float64Var(&f.elevationM, "elevation-m", 0, "release site elevation, `metres` (−500 to 5000)")
	fs.Var(&f.tempC, "temp-c", "measured air temperature, `°C` (−40 to 50; default: the standard atmosphere's)")
	fs.BoolVar(&f.passerine, "passerine", false, "a passerine (songbird): its basal metabolic rate")
	fs.BoolVar(&f.migrant, "migrant", false, "a migrant: show the still-air range on its fat")
	fs.Var(&f.fatScore, "fat-score", "fat `score` on --fat-scale")
	fs.StringVar(&f.fatScale, "fat-scale", "", "scale of --fat-score: 0-8 (Kaiser) or 0-5 (Helms & Drury)")
	fs.Var(&f.muscleScore, "muscle-score", "pectoral muscle `score`, 0 to 3")
	fs.StringVar(&f.params, "params", "", "parameter set: "+strings.Join(assess.ParamSetNames, " or ")+" (default "+assess.ParamSetNames[0]+")")
	fs.BoolVar(&f.json, "json", false, "print one JSON object")
	fs.StringVar(&f.species, "species", "", "compare with a healthy bird of this species (scientific or common `name`); mass, span and area default to its reference")
	fs.StringVar(&f.sex, "sex", "unknown", "the bird's sex, for the species' reference mass: female, male or unknown")
	fs.StringVar(&f.db, "db", "", "with --species: the centre's database `file`, whose species overrides and added species apply")
}

// curveOutput is the JSON of `aloft curve`: the flight result, and with
// --species the species compared with and its normal launch mode.
type curveOutput struct {
	assess.FlightResult
	Species    *curveSpecies      `json:"species,omitempty"`
	LaunchMode *assess.LaunchMode `json:"launch_mode,omitempty"`
}

type curveSpecies struct {
	ScientificName string `json:"scientific_name"`
	CommonName     string `json:"common_name"`
}

// withSpecies fills in the species' reference for sex: unset mass, span and
// area take the reference's values; the passerine and migrant flags its own.
func (f *curveFlags) withSpecies(in *assess.FlightInput, sp *assess.Species, set map[string]bool) error {
	sex := assess.Sex(f.sex)
	if !sex.Valid() {
		return &assess.ValidationError{Field: "sex", Value: f.sex, Message: "female, male or unknown"}
	}
	ref := sp.Reference(sex)
	in.Reference = &ref
	if !set["mass-g"] {
		in.MassKg = ref.MassKg
	}
	if !set["span-mm"] {
		in.SpanM = ref.SpanM
	}
	if !set["area-cm2"] {
		if set["span-mm"] {
			in.AreaM2 = 0 // estimated from the reference by geometric similarity, flagged
		} else {
			in.AreaM2 = ref.AreaM2
		}
	}
	in.Passerine = in.Passerine || sp.Passerine
	in.Migrant = in.Migrant || sp.Migrant
	return nil
}

// flightInput converts the flags to the engine's input, SI inside. A species
// reference, when one is added, goes into Reference here.
func (f *curveFlags) flightInput() (assess.FlightInput, error) {
	p, err := assess.ParamSet(f.params)
	if err != nil {
		return assess.FlightInput{}, err
	}
	in := assess.FlightInput{
		MassKg: f.massG / 1000, SpanM: f.spanMM / 1000, AreaM2: f.areaCM2 / 1e4,
		Passerine: f.passerine, Migrant: f.migrant,
		FatScale: assess.FatScale(f.fatScale), FatScore: f.fatScore.ptr(), MuscleScore: f.muscleScore.ptr(),
		Site:   assess.Site{ElevationM: f.elevationM, TempC: f.tempC.ptr()},
		Params: p,
	}
	if in.FatScore != nil && f.fatScale == "" {
		return in, &assess.ValidationError{Field: "fat_scale", Value: "",
			Message: "give the fat score's scale with it: 0-8 (Kaiser) or 0-5 (Helms & Drury)"}
	}
	return in, nil
}

// cmdCurve prints a bird's power curve, characteristic speeds and margins.
func cmdCurve(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("curve", curveSynopsis, cio)
	var f curveFlags
	f.register(fs)
	// A bad flag gets the flag package's one-line error, not the whole usage;
	// --help still prints it.
	usage := fs.Usage
	fs.Usage = func() {}
	if code, ok := parseFlags(fs, args, cio); !ok {
		if code == exitOK {
			usage()
		}
		return code
	}
	if fs.NArg() > 0 {
		return usageErr(cio, "curve", "unexpected argument %q", fs.Arg(0))
	}
	set := map[string]bool{}
	fs.Visit(func(fl *flag.Flag) { set[fl.Name] = true })
	var sp *assess.Species
	if f.species != "" {
		var err error
		if sp, err = findCurveSpecies(ctx, f.species, f.db); errors.Is(err, assess.ErrUnknownSpecies) {
			return usageErr(cio, "curve", "--species: no species named %q (try aloft species list)", f.species)
		} else if err != nil {
			return failErr(cio, "curve", err)
		}
	} else if f.db != "" {
		return usageErr(cio, "curve", "--db needs --species: the database's species values apply to a species")
	} else {
		for _, name := range []string{"mass-g", "span-mm", "area-cm2"} {
			if !set[name] {
				return usageErr(cio, "curve", "--%s is required (or give --species)", name)
			}
		}
	}
	in, err := f.flightInput()
	if err == nil && sp != nil {
		err = f.withSpecies(&in, sp, set)
	}
	if err == nil {
		var r assess.FlightResult
		if r, err = assess.Flight(in); err == nil {
			out := curveOutput{FlightResult: r}
			if sp != nil {
				out.Species = &curveSpecies{ScientificName: sp.ScientificName, CommonName: sp.CommonName}
				lm := sp.LaunchMode
				out.LaunchMode = &lm
			}
			return printCurve(cio, out, f.json)
		}
	}
	var ve *assess.ValidationError
	var ves assess.ValidationErrors
	if errors.As(err, &ves) || errors.As(err, &ve) {
		return usageErr(cio, "curve", "%s", flagErrors(fs, err))
	}
	return failErr(cio, "curve", err)
}

// findCurveSpecies finds a species in the shipped table or, with dbPath, in
// the centre's table of that database (its overrides and added species).
func findCurveSpecies(ctx context.Context, name, dbPath string) (*assess.Species, error) {
	if dbPath == "" {
		table, err := assess.LoadSpecies()
		if err != nil {
			return nil, err
		}
		return table.Find(name)
	}
	store, err := openExisting(ctx, dbPath)
	if err != nil {
		return nil, err
	}
	defer store.Close()
	return store.SpeciesFor(ctx, name)
}

// printCurve writes r as JSON or as a summary.
func printCurve(cio cmdIO, r curveOutput, asJSON bool) int {
	var err error
	if asJSON {
		err = json.NewEncoder(cio.Stdout).Encode(r)
	} else {
		if r.Species != nil {
			fmt.Fprintf(cio.Stdout, "Compared with a healthy %s (%s); normal launch: %s\n", r.Species.CommonName, r.Species.ScientificName, *r.LaunchMode)
		}
		err = writeCurveText(cio.Stdout, r.FlightResult)
	}
	if err != nil {
		return failErr(cio, "curve", err)
	}
	return exitOK
}

// flagErrors formats validation errors on one line, naming the flags.
func flagErrors(fs *flag.FlagSet, err error) string {
	var ves assess.ValidationErrors
	if !errors.As(err, &ves) {
		var ve *assess.ValidationError
		errors.As(err, &ve)
		ves = assess.ValidationErrors{ve}
	}
	parts := make([]string, len(ves))
	for i, e := range ves {
		name := e.Field
		if fl := strings.ReplaceAll(e.Field, "_", "-"); fs.Lookup(fl) != nil {
			name = "--" + fl
		}
		parts[i] = fmt.Sprintf("%s: %s (got %q)", name, e.Message, e.Value)
	}
	return strings.Join(parts, "; ")
}

// writeCurveText writes the readable summary of r.
func writeCurveText(out io.Writer, r assess.FlightResult) error {
	sections := curveSections(r)
	width := 0
	for _, s := range sections {
		for _, r := range s.rows {
			width = max(width, utf8.RuneCountInString(r.label))
		}
	}
	var b strings.Builder
	p := r.Params
	fmt.Fprintf(&b, "Flight model, parameter set %s (k %g, C_Db %g, C_pro %g, η %g, R %g)\n",
		p.Name, p.K, p.CDb, p.CPro, p.Eta, p.R)
	for _, s := range sections {
		fmt.Fprintf(&b, "\n%s\n", s.title)
		for _, r := range s.rows {
			fmt.Fprintf(&b, "  %-*s  %s\n", width, r.label, r.value)
		}
	}
	b.WriteString("\nNotes\n")
	for _, n := range r.Notes {
		fmt.Fprintf(&b, "  - %s\n", n)
	}
	b.WriteString("\nAdvisory only: the veterinarian and the licensed rehabilitator decide.\n")
	_, err := io.WriteString(out, b.String())
	return err
}

// curveSections lays out r's numbers with their units, in sections.
func curveSections(r assess.FlightResult) []section {
	area := fmt.Sprintf("%.1f cm²", r.AreaM2*1e4)
	if r.WingAreaEstimated {
		area += " (estimated from span)"
	}
	return []section{
		{"Air and shape", []row{
			{"air density", fmt.Sprintf("%.4f kg/m³", r.AirDensityKgM3)},
			{"wing area", area},
			{"aspect ratio", fmt.Sprintf("%.2f", r.AspectRatio)},
			{"wing loading", fmt.Sprintf("%.1f N/m²", r.WingLoadingNM2)},
			{"disc loading", fmt.Sprintf("%.2f N/m²", r.DiscLoadingNM2)},
			{"minimum speed from wing loading", fmt.Sprintf("%.2f m/s (healthy reference %.2f m/s)", r.MinSpeedMS, r.ReferenceMinSpeedMS)}}},
		{"Power curve at the site", []row{
			{"minimum-power speed", fmt.Sprintf("%.2f m/s", r.MinPowerSpeedMS)},
			{"maximum-range speed", fmt.Sprintf("%.2f m/s (mechanical %.2f m/s)", r.MaxRangeSpeedMS, r.MaxRangeSpeedMechMS)},
			{"absolute minimum power", fmt.Sprintf("%.3f W", r.AbsoluteMinPowerW)},
			{"profile power", fmt.Sprintf("%.3f W", r.ProfilePowerW)},
			{"minimum power, mechanical", fmt.Sprintf("%.3f W", r.MinPowerMechW)},
			{"minimum power, chemical", fmt.Sprintf("%.3f W", r.MinPowerChemW)},
			{"hover power (lower bound)", fmt.Sprintf("%.3f W", r.HoverPowerW)},
			{"wingbeat frequency", fmt.Sprintf("%.2f Hz", r.WingbeatHz)},
			{"effective lift:drag", fmt.Sprintf("%.2f", r.EffectiveLiftDrag)}}},
		{"Power margin", []row{
			{"healthy margin at sea level", fmt.Sprintf("%.2f", r.ExpectedMargin)},
			{"healthy margin at this site", fmt.Sprintf("%.2f", r.ExpectedMarginSite)},
			{"available power", fmt.Sprintf("%.3f W", r.AvailablePowerW)},
			{"power margin", fmt.Sprintf("%.2f", r.PowerMargin)},
			{"margin ratio (to healthy at site)", fmt.Sprintf("%.2f", r.MarginRatio)},
			{"excess-power fraction", optional(r.ExcessPowerFraction, "%.2f")},
			{"climb rate at minimum-power speed", fmt.Sprintf("%.2f m/s", r.ClimbRateMS)},
			{"speed window", window(r.SpeedWindowMS)}}},
		{"Takeoff", []row{
			{"takeoff index", fmt.Sprintf("%.2f: %s", r.TakeoffIndex, r.TakeoffBand.Label())},
			{"flight-muscle lift over weight (Marden)", optional(r.MardenLiftRatio, "%.2f")}}},
		{"Condition and range", []row{
			{"fat fraction", fmt.Sprintf("%.2f%s", r.FatFraction, assumed(r.FatAssumed))},
			{"muscle condition", map[bool]string{true: "assumed healthy", false: "scored"}[r.MuscleAssumed]},
			{"still-air range", optional(r.StillAirRangeKm, "%.0f km")}}},
	}
}

type section struct {
	title string
	rows  []row
}

type row struct{ label, value string }

// optional formats a nullable number; null reads "not defined (see notes)".
func optional(x *float64, format string) string {
	if x == nil {
		return "not defined (see notes)"
	}
	return fmt.Sprintf(format, *x)
}

func window(w *[2]float64) string {
	if w == nil {
		return "none (see notes)"
	}
	return fmt.Sprintf("%.2f to %.2f m/s", w[0], w[1])
}

func assumed(a bool) string {
	if a {
		return " (assumed)"
	}
	return ""
}

// optFloat is a float flag that records whether it was given.
type optFloat struct {
	v   float64
	set bool
}

func (o *optFloat) String() string {
	if o == nil || !o.set {
		return ""
	}
	return strconv.FormatFloat(o.v, 'g', -1, 64)
}

func (o *optFloat) Set(s string) error {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return errors.New("expected a number")
	}
	o.v, o.set = v, true
	return nil
}

func (o *optFloat) ptr() *float64 {
	if !o.set {
		return nil
	}
	v := o.v
	return &v
}

// optInt is an integer flag that records whether it was given.
type optInt struct {
	v   int
	set bool
}

func (o *optInt) String() string {
	if o == nil || !o.set {
		return ""
	}
	return strconv.Itoa(o.v)
}

func (o *optInt) Set(s string) error {
	v, err := strconv.Atoi(s)
	if err != nil {
		return errors.New("expected a whole number")
	}
	o.v, o.set = v, true
	return nil
}

func (o *optInt) ptr() *int {
	if !o.set {
		return nil
	}
	v := o.v
	return &v
}
