package demo

import "maps"

// eventSeeders maps each event kind of the scenario to the function that
// stores it. Each record feature contributes its kinds from its own file.
func eventSeeders() map[string]eventSeeder {
	all := map[string]eventSeeder{}
	for _, part := range []map[string]eventSeeder{
		conditioningSeeders(),
		clinicalSeeders(),
		dispositionSeeders(),
	} {
		maps.Copy(all, part)
	}
	return all
}
