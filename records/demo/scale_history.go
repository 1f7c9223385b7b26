package demo

import (
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"aloft/assess"
	"aloft/records"
)

// scaleProfile is how the invented centre cares for one species: how often
// it comes in, where it is housed, how long a bird that recovers stays.
type scaleProfile struct {
	scientific string
	weight     int  // share of admissions
	young      bool // young birds come in the breeding season
	// overwinter: a bird fit to go in late autumn or winter is held until
	// spring, when others of its kind are back.
	overwinter bool
	// Enclosures: first housing, pre-release housing, and where flight
	// sessions are flown ("" none: the bird is conditioned on water).
	indoor, outdoor, flight string
	stay                    [2]int // days in care before a release, shortest and longest
	reasons                 []string
}

// scaleProfiles are the demo's species (DESIGN.md) with invented shares.
var scaleProfiles = []scaleProfile{
	{"Turdus migratorius", 18, true, true, "Songbird cage 3", "Songbird aviary", "Flight cage B", [2]int{10, 30},
		[]string{"cat caught", "window strike", "orphaned", "fell from nest"}},
	{"Anas platyrhynchos", 16, true, false, "Duck pen", "Waterbird pool", "", [2]int{8, 30},
		[]string{"orphaned", "hit by car", "dog attack", "fishing line entanglement", "oiled"}},
	{"Larus argentatus", 10, true, false, "ICU cage 2", "Gull aviary", "Gull aviary", [2]int{10, 35},
		[]string{"fell from roof", "fishing line entanglement", "oiled", "hit by car"}},
	{"Bombycilla cedrorum", 10, true, true, "Songbird cage 3", "Songbird aviary", "Songbird aviary", [2]int{8, 25},
		[]string{"window strike", "cat caught", "found grounded"}},
	{"Buteo jamaicensis", 8, false, false, "ICU cage 4", "Raptor mews", "Hawk flight", [2]int{20, 60},
		[]string{"hit by car", "found grounded", "caught in netting", "lead poisoning suspected"}},
	{"Accipiter cooperii", 7, false, false, "ICU cage 4", "Raptor mews", "Hawk flight 2", [2]int{18, 50},
		[]string{"window strike", "hit by car", "found grounded"}},
	{"Apus apus", 6, true, true, "Swift box", "Swift flight room", "Swift flight room", [2]int{14, 40},
		[]string{"found grounded", "fell from nest", "cat caught"}},
	{"Cygnus olor", 4, false, false, "Large waterfowl pen", "Lake pen", "", [2]int{20, 60},
		[]string{"power line collision", "fishing line entanglement", "lead poisoning suspected", "oiled"}},
	{"Ardea herodias", 4, false, false, "Heron pen", "Heron aviary", "Heron aviary", [2]int{15, 45},
		[]string{"fishing line entanglement", "hit by car", "found grounded"}},
	{"Pandion haliaetus", 3, false, false, "ICU cage 4", "Long flight South", "Long flight South", [2]int{20, 50},
		[]string{"fishing line entanglement", "found grounded", "hit by car"}},
	{"Gavia immer", 3, false, false, "Soft-floor pen", "Seabird pool", "", [2]int{7, 25},
		[]string{"stranded on land", "oiled", "fishing line entanglement"}},
	{"Morus bassanus", 3, false, false, "Soft-floor pen", "Seabird pool", "", [2]int{7, 25},
		[]string{"storm-blown inland", "oiled", "caught in netting"}},
	{"Falco peregrinus", 2, true, false, "ICU cage 4", "Raptor mews", "Long flight North", [2]int{20, 60},
		[]string{"found grounded", "window strike", "fell from nest"}},
}

// Invented people and places of the demo's neighbourhood.
var (
	scaleFirst  = []string{"Ailsa", "Bram", "Cora", "Dev", "Elin", "Fenn", "Greer", "Hal", "Ines", "Jory", "Kit", "Lorne", "Mae", "Nell", "Orrin", "Pia", "Rhea", "Sol", "Tove", "Ula", "Vance", "Wynn", "Yara", "Zeb"}
	scaleLast   = []string{"Ashgrove", "Birchall", "Dunmore", "Eddow", "Fallowby", "Gorsedge", "Hollin", "Ivesley", "Kestle", "Larchmont", "Mereworth", "Nettlefold", "Oakhurst", "Quarrie", "Rushmere", "Thornbury", "Underhay", "Vellacott", "Whinmoor", "Yarrowby"}
	scaleTowns  = []string{"Wrenfield", "Hartsfell", "Sallowmere", "Brackenhithe", "Mossgate", "Thornacre", "Elderholm", "Coldwater Rise"}
	scaleSpots  = []string{"garden", "school playing field", "bus station", "reservoir", "harbour wall", "ring road verge", "allotments", "church roof", "beach", "golf course", "retail park", "canal towpath"}
	scaleSites  = []string{"Wrenfield Common", "Sallowmere reed beds", "Hartsfell reservoir", "Brackenhithe woods", "Mossgate estuary", "Thornacre farmland edge"}
	scaleTakers = []string{"Brackenhithe Wildlife Hospital", "Mossgate Seabird Centre", "Thornacre Raptor Trust", "Elderholm Waterfowl Refuge"}
)

// scaleHist builds one invented patient's history.
type scaleHist struct {
	env      *scaleEnv
	rng      *rand.Rand
	prof     *scaleProfile
	sp       *assess.Species
	admitted time.Time
	plan     scalePlan
	reason   string
	young    bool
	massNow  float64 // the latest weigh-in, g
	targetG  float64 // what it weighs when well, g
	days     int     // days in care until the disposition
	outcome  assess.Disposition
	cut      time.Time // no record after this: the disposition, or now for a bird in care
	broken   []int     // primaries (1-based, left wing) broken at intake
}

// plan invents patient i of n, admitted at admitted. The random source is
// the patient's own, so the pool of planners gives the same result in any
// order.
func (env *scaleEnv) plan(i, n int, admitted time.Time) (scalePlan, error) {
	rng := rand.New(rand.NewPCG(uint64(n), uint64(i)))
	h := &scaleHist{env: env, rng: rng, admitted: admitted}
	h.prof = pickProfile(rng, admitted)
	h.sp = env.species[h.prof.scientific]
	h.intake()
	h.decide()
	if err := h.history(); err != nil {
		return scalePlan{}, fmt.Errorf("demo: scale patient %d (%s): %w", i, h.sp.CommonName, err)
	}
	h.dispose()
	return h.plan, nil
}

// pickProfile draws a species by its share; young-bird species are drawn
// twice as often in the breeding season (May to August).
func pickProfile(rng *rand.Rand, at time.Time) *scaleProfile {
	summer := at.Month() >= time.May && at.Month() <= time.August
	w := func(p *scaleProfile) int {
		if summer && p.young {
			return 2 * p.weight
		}
		return p.weight
	}
	total := 0
	for i := range scaleProfiles {
		total += w(&scaleProfiles[i])
	}
	r := rng.IntN(total)
	for i := range scaleProfiles {
		if r -= w(&scaleProfiles[i]); r < 0 {
			return &scaleProfiles[i]
		}
	}
	return &scaleProfiles[0]
}

func (h *scaleHist) pick(list []string) string { return list[h.rng.IntN(len(list))] }

// between draws uniformly from [lo, hi).
func (h *scaleHist) between(lo, hi float64) float64 { return lo + h.rng.Float64()*(hi-lo) }

// carer is who enters a routine record: a staff member or the volunteer.
func (h *scaleHist) carer() int64 {
	if h.rng.IntN(3) == 0 {
		return h.env.users["volunteer"].ID
	}
	return h.env.users["staff"].ID
}

// intake draws the admission: age, sex, reason, finder and intake mass.
func (h *scaleHist) intake() {
	summer := h.admitted.Month() >= time.May && h.admitted.Month() <= time.August
	age := "adult"
	switch r := h.rng.Float64(); {
	case h.prof.young && summer && r < 0.5:
		age = []string{"nestling", "fledgling", "fledgling", "juvenile"}[h.rng.IntN(4)]
		h.young = true
	case r < 0.15:
		age = "immature"
	case r < 0.22:
		age = "unknown"
	}
	sex := assess.SexUnknown
	if age == "adult" && (h.sp.Group.RaptorLike() || h.sp.Group == assess.GroupDabblingDuck) {
		sex = []assess.Sex{assess.SexFemale, assess.SexMale, assess.SexUnknown}[h.rng.IntN(3)]
	}
	h.reason = h.pick(h.prof.reasons)
	if h.young {
		h.reason = h.pick([]string{"orphaned", "fell from nest", "found grounded"})
		if h.sp.Group == assess.GroupGull {
			h.reason = "fell from roof"
		}
	}
	lo, hi := h.sp.MassRangeG(sex)
	h.targetG = h.between(lo+0.3*(hi-lo), lo+0.7*(hi-lo))
	switch {
	case age == "nestling":
		h.massNow = lo * h.between(0.35, 0.6)
	case h.young:
		h.massNow = lo * h.between(0.6, 0.95)
	case h.reason == "found grounded" || h.reason == "stranded on land" || h.reason == "storm-blown inland" || h.reason == "lead poisoning suspected":
		h.massNow = lo * h.between(0.62, 0.92)
	default:
		h.massNow = h.targetG * h.between(0.86, 1.0)
	}
	h.massNow = round(h.massNow, massDecimals(lo))
	found := h.admitted
	if h.admitted.Hour() < 12 && h.rng.IntN(2) == 0 {
		found = found.AddDate(0, 0, -1)
	}
	in := records.PatientInput{SpeciesScientific: h.sp.ScientificName, SpeciesCommon: h.sp.CommonName, AgeClass: age, Sex: sex,
		FoundDate: found.Format(records.DateLayout), FoundPlace: h.pick(scaleTowns) + ", " + h.pick(scaleSpots),
		Reason: h.reason, IntakeMassG: h.massNow, AdmittedAt: h.admitted}
	if h.rng.IntN(7) > 0 {
		first, last := h.pick(scaleFirst), h.pick(scaleLast)
		in.FinderName = first + " " + last
		in.FinderContact = fmt.Sprintf("%s.%s@example.org", first, last)
	}
	if mc := assess.CheckMass("intake_mass_g", h.massNow, h.sp, sex); mc != nil && mc.NeedsConfirm {
		in.MassNote = massNote(h.young)
	}
	in.IntakeCondition = intakeCondition(h.reason, h.young)
	h.plan.intake, h.plan.by = in, h.carer()
}

func massNote(young bool) string {
	if young {
		return "Young bird, still growing: weighed twice."
	}
	return "Emaciated: weighed twice on the calibrated scale."
}

func intakeCondition(reason string, young bool) string {
	switch {
	case young:
		return "Alert, begging; no injuries found."
	case reason == "oiled":
		return "Plumage contaminated; cold and quiet."
	case reason == "hit by car" || reason == "power line collision":
		return "Quiet; drooping wing, no bleeding."
	}
	return "Quiet but alert; stands unaided."
}

// massDecimals is how finely a bird of lower mass bound lo is weighed.
func massDecimals(lo float64) int {
	if lo < 200 {
		return 1
	}
	return 0
}

// decide draws the outcome and the length of the stay. A bird whose
// disposition would fall after now is still in care.
func (h *scaleHist) decide() {
	lo, hi := h.prof.stay[0], h.prof.stay[1]
	switch r := h.rng.Float64(); {
	case r < 0.04:
		h.outcome, h.days = assess.DispDeadOnArrival, 0
	case r < 0.18:
		h.outcome, h.days = assess.DispDied, h.rng.IntN(7)
	case r < 0.37:
		h.outcome, h.days = assess.DispEuthanised, h.rng.IntN(11)
	case r < 0.43:
		h.outcome, h.days = assess.DispTransferred, 1+h.rng.IntN(14)
	case r < 0.435:
		h.outcome, h.days = assess.DispEscaped, 5+h.rng.IntN(25)
	case h.young && r < 0.47:
		h.outcome, h.days = assess.DispRenested, h.rng.IntN(2)
	default:
		h.outcome, h.days = assess.DispReleased, lo+h.rng.IntN(hi-lo+1)
	}
	if h.outcome == assess.DispReleased && h.rng.IntN(4) == 0 {
		h.days = 2*h.days + 20 // a slow recovery: a fracture to heal, or feathers to moult in
	}
	if h.outcome == assess.DispReleased && h.prof.overwinter {
		h.days = h.springRelease(h.days)
	}
	end := h.dayAt(h.days, 11, 0)
	h.cut = end
	if limit := h.env.now.Add(-time.Hour); end.After(limit) {
		h.cut, h.outcome = limit, assess.DispInCare
	}
}

// springRelease moves a release that would fall from mid-October to March
// into the spring: the bird overwinters in care.
func (h *scaleHist) springRelease(days int) int {
	d := h.admitted.AddDate(0, 0, days)
	m := d.Month()
	if !(m >= time.November || m <= time.March || (m == time.October && d.Day() >= 15)) {
		return days
	}
	year := d.Year()
	if m >= time.October {
		year++
	}
	spring := time.Date(year, time.April, 10, 0, 0, 0, 0, d.Location()).AddDate(0, 0, h.rng.IntN(40))
	return int(spring.Sub(h.admitted).Hours() / 24)
}

// dayAt is hh:mm on the day days after admission (in the admission's
// location), never before 20 minutes after the admission.
func (h *scaleHist) dayAt(days, hh, mm int) time.Time {
	a := h.admitted
	t := time.Date(a.Year(), a.Month(), a.Day(), hh, mm, 0, 0, a.Location()).AddDate(0, 0, days)
	if earliest := a.Add(20 * time.Minute); t.Before(earliest) {
		t = earliest.Truncate(time.Minute)
	}
	return t
}

// fits reports whether a record at t belongs in the history: before the
// disposition (or now).
func (h *scaleHist) fits(t time.Time) bool { return !t.After(h.cut) }

// muscle is the pectoral muscle score (0–3) the bird's mass suggests.
func (h *scaleHist) muscle() int {
	r := h.massNow / h.targetG
	switch {
	case r < 0.7:
		return 0
	case r < 0.82:
		return 1
	case r < 0.93:
		return 2
	}
	return 3
}

// massOn is the bird's mass on day d: recovering towards its healthy mass,
// or losing weight when it is going to die; with a little day-to-day noise.
func (h *scaleHist) massOn(d int, intake float64) float64 {
	var m float64
	if h.outcome == assess.DispDied || h.outcome == assess.DispEuthanised {
		m = intake * math.Pow(0.985, float64(d))
	} else {
		m = h.targetG + (intake-h.targetG)*math.Exp(-float64(d)/6)
	}
	lo, _ := h.sp.MassRangeG(h.plan.intake.Sex)
	return round(m*h.between(0.99, 1.01), massDecimals(lo))
}
