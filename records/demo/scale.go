package demo

import (
	"context"
	"fmt"
	"math/rand/v2"
	"time"

	"aloft/assess"
	"aloft/records"
)

// SeedScale adds n invented historical patients spread over the ten years
// before now, for load tests. The random source is seeded, so the same n
// gives the same centre.
func SeedScale(ctx context.Context, store *records.Store, species *assess.SpeciesTable, n int, now time.Time) error {
	rng := rand.New(rand.NewPCG(20261202, uint64(n)))
	all := species.All()
	reasons := []string{"window strike", "cat caught", "found grounded", "hit by car", "orphaned", "fishing line entanglement", "oiled"}
	for i := 0; i < n; i++ {
		sp := all[rng.IntN(len(all))]
		lo, hi := sp.MassRangeG(assess.SexUnknown)
		at := now.Add(-time.Duration(rng.Int64N(int64(10 * 365 * 24 * time.Hour))))
		_, err := store.AdmitPatient(ctx, 0, records.PatientInput{
			SpeciesScientific: sp.ScientificName, SpeciesCommon: sp.CommonName, AgeClass: "adult", Sex: assess.SexUnknown,
			FoundDate: at.Format(records.DateLayout), FoundPlace: fmt.Sprintf("Grid square %d", rng.IntN(400)),
			Reason: reasons[rng.IntN(len(reasons))], IntakeMassG: lo + rng.Float64()*(hi-lo), AdmittedAt: at,
		})
		if err != nil {
			return fmt.Errorf("demo: scale patient %d: %w", i, err)
		}
	}
	return nil
}
