package assess

import "testing"

// BenchmarkFlight is one full evaluation: every number of the result, both
// curves, a species reference at a high, warm site. Target: under 20 µs.
func BenchmarkFlight(b *testing.B) {
	ref := Reference{MassKg: 0.11, SpanM: 0.42, AreaM2: 0.032}
	temp := 25.0
	in := FlightInput{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, Reference: &ref, Migrant: true,
		FatScore: ptr(4), FatScale: FatScaleKaiser, MuscleScore: ptr(2), Site: Site{ElevationM: 1500, TempC: &temp}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Flight(in); err != nil {
			b.Fatal(err)
		}
	}
}
