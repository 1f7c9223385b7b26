package assess

import (
	"slices"
	"time"
)

// The record types below are the engine's inputs: what staff record about a
// patient, in the units they record it. package records stores them (with
// who, when, versions and audit); Evaluate reads them. Each carries its own
// instant At (when the observation was made, not when it was typed).

// FedState says whether a weigh-in was before or after feeding: crop
// contents skew a mass, so release masses are compared before the first feed.
type FedState string

// Fed states.
const (
	FedBefore  FedState = "before-feed"
	FedAfter   FedState = "after-feed"
	FedUnknown FedState = "unknown"
)

// FedStates lists the fed states.
var FedStates = []FedState{FedBefore, FedAfter, FedUnknown}

// WeighIn is one weighing.
type WeighIn struct {
	At    time.Time `json:"at"`
	MassG float64   `json:"mass_g"` // grams, > 0
	Fed   FedState  `json:"fed"`
	// Note is free text; when a mass far outside the species' range was
	// confirmed, it holds the reason given.
	Note string `json:"note,omitempty"`
}

// ConditionScore is one palpation: fat, pectoral muscle (keel), and an
// optional overall body-condition score. Nil means not scored.
type ConditionScore struct {
	At            time.Time `json:"at"`
	FatScore      *int      `json:"fat_score"`
	FatScale      FatScale  `json:"fat_scale"`
	MuscleScore   *int      `json:"muscle_score"`   // pectoral muscle 0–3 (Bairlein 1995)
	BodyCondition *int      `json:"body_condition"` // 1–5, veterinary practice
}

// FeatherStatus is the state of one flight feather.
type FeatherStatus string

// Feather statuses.
const (
	FeatherIntact     FeatherStatus = "intact"
	FeatherMissing    FeatherStatus = "missing"
	FeatherBroken     FeatherStatus = "broken"
	FeatherPin        FeatherStatus = "pin" // growing: pin or blood feather
	FeatherImped      FeatherStatus = "imped"
	FeatherFrayed     FeatherStatus = "frayed"
	FeatherStressBars FeatherStatus = "stress-bars"
)

// FeatherStatuses lists the feather statuses.
var FeatherStatuses = []FeatherStatus{FeatherIntact, FeatherMissing, FeatherBroken, FeatherPin,
	FeatherImped, FeatherFrayed, FeatherStressBars}

// Valid reports whether f is a known status.
func (f FeatherStatus) Valid() bool { return slices.Contains(FeatherStatuses, f) }

// Damaged reports whether the feather gives less than a whole vane:
// missing, broken or still growing. (Imped, frayed and stress-barred
// feathers are recorded but count as flight surfaces.)
func (f FeatherStatus) Damaged() bool {
	return f == FeatherMissing || f == FeatherBroken || f == FeatherPin
}

// FeatherMap is the flight feathers of both wings and the tail. Primaries
// are numbered from the innermost (P1) outwards, as ringers and moult
// studies number them; index 0 is P1. Secondaries are numbered from the
// outermost (S1, next to P1) inwards. Rectrices per side from the central
// pair (R1) outwards. A nil map means the feathers were not examined.
type FeatherMap struct {
	LeftPrimaries    []FeatherStatus `json:"left_primaries"`
	RightPrimaries   []FeatherStatus `json:"right_primaries"`
	LeftSecondaries  []FeatherStatus `json:"left_secondaries"`
	RightSecondaries []FeatherStatus `json:"right_secondaries"`
	TailLeft         []FeatherStatus `json:"tail_left"`
	TailRight        []FeatherStatus `json:"tail_right"`
}

// AreaMethod says how a wing area was obtained.
type AreaMethod string

// Area methods.
const (
	AreaTraced    AreaMethod = "traced"    // traced or photographed and measured
	AreaEstimated AreaMethod = "estimated" // S_ref·(b/b_ref)² from the species reference
)

// WingMeasurement is one measuring session of the wings.
type WingMeasurement struct {
	At         time.Time   `json:"at"`
	SpanMM     *float64    `json:"span_mm"`  // tip to tip, wings fully spread
	AreaCM2    *float64    `json:"area_cm2"` // both wings plus the body strip
	AreaMethod AreaMethod  `json:"area_method"`
	ChordMM    *float64    `json:"chord_mm"` // flattened wing chord (not AVONET's unflattened one)
	Feathers   *FeatherMap `json:"feathers"`
	// Note is free text; when a span far from the species' reference was
	// confirmed, it holds the reason given.
	Note string `json:"note,omitempty"`
}

// AttemptResult is the outcome of one takeoff attempt.
type AttemptResult string

// Attempt results.
const (
	AttemptClimbed AttemptResult = "climbed" // climbed away
	AttemptLevel   AttemptResult = "level"   // flew level, no height gained
	AttemptShort   AttemptResult = "short"   // landed short
	AttemptFailed  AttemptResult = "failed"  // failed to lift
)

// AttemptResults lists the attempt results, best first.
var AttemptResults = []AttemptResult{AttemptClimbed, AttemptLevel, AttemptShort, AttemptFailed}

// WindStrength and WindDirection describe the wind at a trial.
type (
	WindStrength  string
	WindDirection string
)

// Wind strengths and directions.
const (
	WindCalm     WindStrength  = "calm"
	WindLight    WindStrength  = "light"
	WindModerate WindStrength  = "moderate"
	WindStrong   WindStrength  = "strong"
	WindHead     WindDirection = "head"
	WindTail     WindDirection = "tail"
	WindCross    WindDirection = "cross"
	WindNone     WindDirection = ""
)

// TakeoffTrial is one set of takeoff attempts in one mode.
type TakeoffTrial struct {
	At          time.Time       `json:"at"`
	Mode        LaunchMode      `json:"mode"`        // a trial mode (launch modes plus drop)
	ModeReason  string          `json:"mode_reason"` // required when the mode is not safe for the group
	Surface     string          `json:"surface"`
	RunUpM      *float64        `json:"run_up_m"`
	DropHeightM *float64        `json:"drop_height_m"`
	Wind        WindStrength    `json:"wind"`
	WindDir     WindDirection   `json:"wind_dir"`
	Attempts    []AttemptResult `json:"attempts"`
	Notes       string          `json:"notes"`
}

// Exercise is the kind of flight exercise a session was.
type Exercise string

// Exercise kinds.
const (
	ExerciseCage       Exercise = "cage"
	ExerciseCreance    Exercise = "creance"
	ExerciseFreeFlight Exercise = "free-flight"
)

// HeightReached is the highest point a bird reached in a session.
type HeightReached string

// Heights, lowest first.
const (
	HeightFloor     HeightReached = "floor"
	HeightLowPerch  HeightReached = "low-perch"
	HeightHighPerch HeightReached = "high-perch"
	HeightCeiling   HeightReached = "ceiling"
)

// Heights lists the heights, lowest first.
var Heights = []HeightReached{HeightFloor, HeightLowPerch, HeightHighPerch, HeightCeiling}

// Droop is a wing held low in or after flight.
type Droop string

// Droop values.
const (
	DroopNone  Droop = "none"
	DroopLeft  Droop = "left"
	DroopRight Droop = "right"
)

// FlightSession is one flight-cage (or creance, or free-flight) session.
type FlightSession struct {
	At                 time.Time     `json:"at"`
	Exercise           Exercise      `json:"exercise"`
	EnclosureName      string        `json:"enclosure_name"`
	EnclosureLengthM   *float64      `json:"enclosure_length_m"` // the flight's length: passes are lengths of this
	AirTempC           *float64      `json:"air_temp_c"`
	DurationS          *int          `json:"duration_s"`
	Passes             int           `json:"passes"`
	LongestRun         int           `json:"longest_run"` // longest unbroken run of passes, ≤ Passes
	Highest            HeightReached `json:"highest"`
	Landings           int           `json:"landings"`
	LandingsControlled int           `json:"landings_controlled"` // ≤ Landings
	RecoveryS          *int          `json:"recovery_s"`          // breathing back to resting, s
	OpenMouth          bool          `json:"open_mouth"`
	TailBobbing        bool          `json:"tail_bobbing"`
	Droop              Droop         `json:"droop"`
	Asymmetry          bool          `json:"asymmetry"`
	WingbeatHz         *float64      `json:"wingbeat_hz"` // counted from slow-motion video
	// Group is true when the session was recorded for a group of birds
	// housed and flown together; GroupSize counts them. Per-bird fields then
	// describe the group unless PerBird is true.
	Group     bool `json:"group"`
	GroupSize int  `json:"group_size"`
	PerBird   bool `json:"per_bird"`
	// GroupCases lists the case numbers of the birds a group session
	// covered (GroupSize of them), so each bird's record names the others.
	GroupCases []string `json:"group_cases,omitempty"`
	Notes      string   `json:"notes"`
}

// WaterproofResult is the outcome of a waterproofing test.
type WaterproofResult string

// Waterproofing results.
const (
	WaterproofYes     WaterproofResult = "waterproof"
	WaterproofPartial WaterproofResult = "partly-wet"
	WaterproofNo      WaterproofResult = "not-waterproof"
)

// WaterproofTest is one test on water.
type WaterproofTest struct {
	At             time.Time        `json:"at"`
	MinutesOnWater float64          `json:"minutes_on_water"`
	WetToSkin      bool             `json:"wet_to_skin"`
	Result         WaterproofResult `json:"result"`
}

// EnclosureKind is a kind of enclosure.
type EnclosureKind string

// Enclosure kinds.
const (
	EnclosureIndoorCage    EnclosureKind = "indoor-cage"
	EnclosureOutdoorAviary EnclosureKind = "outdoor-aviary"
	EnclosureFlightCage    EnclosureKind = "flight-cage"
	EnclosurePool          EnclosureKind = "pool"
)

// Housing is a stay in one enclosure from From; the next Housing ends it.
type Housing struct {
	From          time.Time     `json:"from"`
	EnclosureName string        `json:"enclosure_name"`
	Kind          EnclosureKind `json:"kind"`
	LengthM       float64       `json:"length_m"`
	WidthM        float64       `json:"width_m"`
	HeightM       float64       `json:"height_m"`
	// Prerelease is true for outdoor pre-release housing (aviary, flight
	// cage or pool enclosure), the time that counts towards release.
	Prerelease bool `json:"prerelease"`
}

// ClearanceItem is one item of clinical clearance.
type ClearanceItem string

// Clearance items (PRACTICE.md: all groups; live prey for raptors and owls).
const (
	ClearInjuries  ClearanceItem = "injuries-healed"
	ClearVision    ClearanceItem = "vision"
	ClearFeetLegs  ClearanceItem = "feet-legs"
	ClearPerching  ClearanceItem = "perching-preening"
	ClearFeeding   ClearanceItem = "self-feeding"
	ClearLivePrey  ClearanceItem = "live-prey"
	ClearBehaviour ClearanceItem = "behaviour"
	ClearDisease   ClearanceItem = "disease-quarantine"
)

// ClearanceItems lists every clearance item in display order.
var ClearanceItems = []ClearanceItem{ClearInjuries, ClearVision, ClearFeetLegs, ClearPerching,
	ClearFeeding, ClearLivePrey, ClearBehaviour, ClearDisease}

// ClearanceState is the state of a clearance item.
type ClearanceState string

// Clearance states.
const (
	ClearanceCleared     ClearanceState = "cleared"
	ClearanceNotCleared  ClearanceState = "not-cleared"
	ClearanceNotExamined ClearanceState = "not-examined"
)

// Clearance is the current state of one item, and who set it.
type Clearance struct {
	Item  ClearanceItem  `json:"item"`
	State ClearanceState `json:"state"`
	By    string         `json:"by"`   // display name of the vet or rehabilitator
	Role  string         `json:"role"` // "vet" or "rehabilitator"
	At    time.Time      `json:"at"`
	Note  string         `json:"note"`
}

// CaseInputs is everything Evaluate reads about one patient: its current
// (latest, not removed) records in time order, oldest first.
type CaseInputs struct {
	Sex           Sex               `json:"sex"`
	AgeClass      string            `json:"age_class"`
	AdmittedAt    time.Time         `json:"admitted_at"`
	WeighIns      []WeighIn         `json:"weigh_ins"`
	Conditions    []ConditionScore  `json:"conditions"`
	Wings         []WingMeasurement `json:"wings"`
	Trials        []TakeoffTrial    `json:"trials"`
	Sessions      []FlightSession   `json:"sessions"`
	Waterproofing []WaterproofTest  `json:"waterproofing"`
	Housing       []Housing         `json:"housing"`
	Clearances    []Clearance       `json:"clearances"`
}
