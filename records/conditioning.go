package records

import (
	"context"
	"fmt"
	"time"

	"aloft/assess"
)

// Kinds of conditioning record, stored as versioned entries (entries.go).
const (
	KindWeighIn    Kind = "weigh-in"       // assess.WeighIn
	KindCondition  Kind = "condition"      // assess.ConditionScore
	KindWing       Kind = "wing"           // assess.WingMeasurement
	KindTrial      Kind = "trial"          // assess.TakeoffTrial
	KindSession    Kind = "flight-session" // assess.FlightSession
	KindWaterproof Kind = "waterproof"     // assess.WaterproofTest
	KindHousing    Kind = "housing"        // assess.Housing
)

// ConditioningKinds lists the conditioning kinds in the order pages show them.
var ConditioningKinds = []Kind{KindWeighIn, KindCondition, KindWing, KindTrial, KindSession, KindWaterproof, KindHousing}

// AddOpts are the options of the Add… methods.
type AddOpts struct {
	// IdempotencyKey, when set, makes a repeated submission of the same form
	// return the entry already stored with ErrDuplicate.
	IdempotencyKey string
}

// The Add… methods below check what the record itself can tell (scores in
// their scale, counts consistent, enums known) and store it with its audit
// row. Checks that need the species (mass and span plausibility, safe trial
// modes, feather counts, the drop cap) are the caller's: the web forms and
// the demo seeder run them first.

// AddWeighIn stores a weigh-in of patient patientID.
func (s *Store) AddWeighIn(ctx context.Context, actorID, patientID int64, w assess.WeighIn, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindWeighIn, w.At, w, w.Validate(), opts)
}

// AddCondition stores a condition score.
func (s *Store) AddCondition(ctx context.Context, actorID, patientID int64, c assess.ConditionScore, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindCondition, c.At, c, c.Validate(), opts)
}

// AddWing stores a wing measurement with its feather map.
func (s *Store) AddWing(ctx context.Context, actorID, patientID int64, w assess.WingMeasurement, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindWing, w.At, w, w.Validate(nil), opts)
}

// AddTrial stores a takeoff trial.
func (s *Store) AddTrial(ctx context.Context, actorID, patientID int64, t assess.TakeoffTrial, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindTrial, t.At, t, t.Validate(assess.TrialRules{}), opts)
}

// AddSession stores a flight session.
func (s *Store) AddSession(ctx context.Context, actorID, patientID int64, f assess.FlightSession, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindSession, f.At, f, f.Validate(), opts)
}

// AddWaterproof stores a waterproofing test.
func (s *Store) AddWaterproof(ctx context.Context, actorID, patientID int64, w assess.WaterproofTest, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindWaterproof, w.At, w, w.Validate(), opts)
}

// AddHousing stores a move into an enclosure (Enclosure.Housing makes one).
func (s *Store) AddHousing(ctx context.Context, actorID, patientID int64, h assess.Housing, opts AddOpts) (Entry, error) {
	return s.addChecked(ctx, actorID, patientID, KindHousing, h.From, h, h.Validate(), opts)
}

func (s *Store) addChecked(ctx context.Context, actorID, patientID int64, kind Kind, at time.Time, data any, verr error, opts AddOpts) (Entry, error) {
	if at.IsZero() {
		return Entry{}, assess.ValidationErrors{{Field: "at", Message: "give the date and time of the observation"}}
	}
	if verr != nil {
		return Entry{}, verr
	}
	return s.AddEntry(ctx, actorID, NewEntry{PatientID: patientID, Kind: kind, At: at, Data: data, IdempotencyKey: opts.IdempotencyKey})
}

// currentOf returns the current records of one kind, oldest first.
func currentOf[T any](ctx context.Context, s *Store, patientID int64, kind Kind) ([]T, error) {
	es, err := s.Entries(ctx, patientID, EntryFilter{Kinds: []Kind{kind}})
	if err != nil {
		return nil, err
	}
	return DecodeAll[T](es)
}

// WeighIns returns a patient's current weigh-ins, oldest first.
func (s *Store) WeighIns(ctx context.Context, patientID int64) ([]assess.WeighIn, error) {
	return currentOf[assess.WeighIn](ctx, s, patientID, KindWeighIn)
}

// Conditions returns a patient's current condition scores, oldest first.
func (s *Store) Conditions(ctx context.Context, patientID int64) ([]assess.ConditionScore, error) {
	return currentOf[assess.ConditionScore](ctx, s, patientID, KindCondition)
}

// Wings returns a patient's current wing measurements, oldest first.
func (s *Store) Wings(ctx context.Context, patientID int64) ([]assess.WingMeasurement, error) {
	return currentOf[assess.WingMeasurement](ctx, s, patientID, KindWing)
}

// Trials returns a patient's current takeoff trials, oldest first.
func (s *Store) Trials(ctx context.Context, patientID int64) ([]assess.TakeoffTrial, error) {
	return currentOf[assess.TakeoffTrial](ctx, s, patientID, KindTrial)
}

// Sessions returns a patient's current flight sessions, oldest first.
func (s *Store) Sessions(ctx context.Context, patientID int64) ([]assess.FlightSession, error) {
	return currentOf[assess.FlightSession](ctx, s, patientID, KindSession)
}

// Waterproofing returns a patient's current waterproofing tests, oldest first.
func (s *Store) Waterproofing(ctx context.Context, patientID int64) ([]assess.WaterproofTest, error) {
	return currentOf[assess.WaterproofTest](ctx, s, patientID, KindWaterproof)
}

// HousingHistory returns a patient's current housing records, oldest first.
func (s *Store) HousingHistory(ctx context.Context, patientID int64) ([]assess.Housing, error) {
	return currentOf[assess.Housing](ctx, s, patientID, KindHousing)
}

// FillConditioning reads every current conditioning record of a patient
// into in (weigh-ins, conditions, wings, trials, sessions, waterproofing,
// housing), oldest first, replacing what those fields held.
func (s *Store) FillConditioning(ctx context.Context, patientID int64, in *assess.CaseInputs) error {
	es, err := s.Entries(ctx, patientID, EntryFilter{Kinds: ConditioningKinds})
	if err != nil {
		return err
	}
	in.WeighIns, in.Conditions, in.Wings, in.Trials = nil, nil, nil, nil
	in.Sessions, in.Waterproofing, in.Housing = nil, nil, nil
	for _, e := range es {
		var err error
		switch e.Kind {
		case KindWeighIn:
			in.WeighIns, err = appendDecoded(in.WeighIns, e)
		case KindCondition:
			in.Conditions, err = appendDecoded(in.Conditions, e)
		case KindWing:
			in.Wings, err = appendDecoded(in.Wings, e)
		case KindTrial:
			in.Trials, err = appendDecoded(in.Trials, e)
		case KindSession:
			in.Sessions, err = appendDecoded(in.Sessions, e)
		case KindWaterproof:
			in.Waterproofing, err = appendDecoded(in.Waterproofing, e)
		case KindHousing:
			in.Housing, err = appendDecoded(in.Housing, e)
		}
		if err != nil {
			return fmt.Errorf("records: conditioning of patient %d: %w", patientID, err)
		}
	}
	return nil
}

func appendDecoded[T any](list []T, e Entry) ([]T, error) {
	var v T
	if err := e.Decode(&v); err != nil {
		return list, err
	}
	return append(list, v), nil
}
