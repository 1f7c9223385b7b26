package demo

// clinicalSeeders stores the clinical records of the demo.
func clinicalSeeders() map[string]eventSeeder { return nil }
