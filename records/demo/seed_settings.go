package demo

import (
	"context"
	"fmt"

	"aloft/assess"
	"aloft/records"
)

// demoChoice is the note on every demo setting: the values are the
// invented demo centre's own choice, not a recommendation.
const demoChoice = "the demo centre's own choice (invented), not a published value"

// demoPasses are the demo centre's pass counts for groups PRACTICE.md gives
// no default, so its ducks, gulls, herons and swifts are assessed on
// stamina and can reach every outcome.
var demoPasses = map[assess.Group]float64{
	assess.GroupDabblingDuck: 6,
	assess.GroupGull:         8,
	assess.GroupHeron:        6,
	assess.GroupSwift:        6,
}

// demoSites are the demo centre's release sites (invented places).
var demoSites = []records.ReleaseSiteInput{
	{Name: "Gullrest Strand", ElevationM: 3, Notes: "Saltmarsh edge with open water for run-up launches (invented)."},
	{Name: "Tarnwhistle Moor", ElevationM: 905, Notes: "Upland moor above the tree line (invented): thinner air."},
}

// seedSettings writes the demo centre's own settings: pass counts set by
// the admin, two release sites added by the rehabilitator, and a local
// mass range for the Mallard set by the vet.
func seedSettings(ctx context.Context, sd *Seeded) error {
	admin, rehab, vet := sd.UserID("admin"), sd.UserID("rehab"), sd.UserID("vet")
	for _, g := range assess.Groups {
		n, ok := demoPasses[g]
		if !ok {
			continue
		}
		if _, err := sd.Store.SetThreshold(ctx, admin, assess.ThPasses, g, n, demoChoice); err != nil {
			return fmt.Errorf("passes for %s: %w", g, err)
		}
	}
	for _, in := range demoSites {
		if _, err := sd.Store.AddReleaseSite(ctx, rehab, in); err != nil {
			return fmt.Errorf("site %s: %w", in.Name, err)
		}
	}
	err := sd.Store.SetSpeciesValues(ctx, vet, "Anas platyrhynchos", []records.SpeciesChange{
		{Field: "mass_range_g.female", Value: assess.RangeG{Min: 800, Max: 1300}},
		{Field: "mass_range_g.male", Value: assess.RangeG{Min: 900, Max: 1450}},
		{Field: "mass_range_g.unknown", Value: assess.RangeG{Min: 800, Max: 1450}},
	}, "local adults weigh more than the shipped mean ± 25 %: the demo centre's own weigh-ins of healthy releases (invented)")
	if err != nil {
		return fmt.Errorf("mallard: %w", err)
	}
	return nil
}
