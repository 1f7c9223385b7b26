package demo

// conditioningSeeders stores the conditioning records of the demo.
func conditioningSeeders() map[string]eventSeeder { return nil }
