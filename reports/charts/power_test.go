package charts

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"aloft/assess"
)

// hawkResult returns the flight model's result for a thin female Red-tailed
// Hawk (950 g, the species' span, the area estimated from the species
// reference) at a 300 m site at 12 °C. It is read from
// testdata/power_result.json, which -update rewrites from assess.Flight, so
// the goldens do not move when the engine does until someone looks.
func hawkResult(t *testing.T) assess.FlightResult {
	t.Helper()
	path := filepath.Join("testdata", "power_result.json")
	if *update {
		table, err := assess.LoadSpecies()
		if err != nil {
			t.Fatal(err)
		}
		sp, err := table.Find("Red-tailed Hawk")
		if err != nil {
			t.Fatal(err)
		}
		ref := sp.Reference(assess.SexFemale)
		r, err := assess.Flight(assess.FlightInput{MassKg: 0.95, SpanM: sp.SpanMM / 1000, Reference: &ref,
			Site: assess.Site{ElevationM: 300, TempC: ptr(12.0)}})
		if err != nil {
			t.Fatal(err)
		}
		data, err := json.MarshalIndent(r, "", "  ")
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, append(data, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	var r assess.FlightResult
	if err := json.Unmarshal(data, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func TestPower(t *testing.T) {
	hawk := hawkResult(t)
	grounded := hawk
	grounded.SpeedWindowMS = nil
	grounded.AvailablePowerW = hawk.MinPowerMechW * 0.9
	grounded.PowerMargin = 0.9
	tests := []struct {
		name     string
		in       PowerInput
		golden   string
		wantAlt  []string
		wantText []string
	}{{
		name:   "hawk with window",
		in:     PowerInput{Result: hawk, SiteLabel: "release site, 300 m, 12 °C"},
		golden: "power_hawk.svg",
		wantAlt: []string{"Power curve at release site, 300 m, 12 °C",
			"minimum-power speed V_mp " + oneDecimal(hawk.MinPowerSpeedMS) + " m/s",
			"maximum-range speed V_mr " + oneDecimal(hawk.MaxRangeSpeedMS) + " m/s",
			"Available power " + sig3(hawk.AvailablePowerW) + " W",
			"Speed window " + oneDecimal(hawk.SpeedWindowMS[0]) + "–" + oneDecimal(hawk.SpeedWindowMS[1]) + " m/s"},
		wantText: []string{"Airspeed (m/s)", "Power (W)", "Mechanical power", "Chemical (fuel) power",
			"Vmp " + oneDecimal(hawk.MinPowerSpeedMS) + " m/s", "Vmr " + oneDecimal(hawk.MaxRangeSpeedMS) + " m/s",
			"At release site, 300 m, 12 °C", "Healthy reference, same site", "Tangent from the origin",
			"Available power " + sig3(hawk.AvailablePowerW) + " W"},
	}, {
		name:     "no speed window",
		in:       PowerInput{Result: grounded},
		golden:   "power_no_window.svg",
		wantAlt:  []string{"No speed window", "a power margin of 0.90"},
		wantText: []string{"Airspeed (m/s)", "Power (W)"},
	}}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := Power(tc.in)
			if err != nil {
				t.Fatalf("Power: %v", err)
			}
			data, doc := renderSVG(t, c)
			wantAlt(t, c, tc.wantAlt...)
			wantTexts(t, doc, tc.wantText...)
			golden(t, tc.golden, data)
		})
	}
}

// TestPower_Tangent checks the drawn tangent against the definition of the
// maximum-range speed: the speed where a line from the origin touches the
// power curve, i.e. where power over speed (energy per distance) is least
// (Pennycuick, C.J. 2008, Modelling the Flying Bird, ch. 2; from memory).
// The minimum of P_chem/V over the drawn curve must match the tangent's
// slope to within the curve's step.
func TestPower_Tangent(t *testing.T) {
	r := hawkResult(t)
	c, err := Power(PowerInput{Result: r})
	if err != nil {
		t.Fatal(err)
	}
	_ = c
	p := powerChart{r: r}
	p.chemAtVmr = interpolate(r.Curve, r.MaxRangeSpeedMS, chem)
	best, bestV := math.Inf(1), 0.0
	for _, pt := range r.Curve[1:] {
		if s := pt.PowerChemW / pt.SpeedMS; s < best {
			best, bestV = s, pt.SpeedMS
		}
	}
	const tol = 0.002 // relative; the curve is flat at its tangent point
	if got := p.tangentSlope(); math.Abs(got-best)/best > tol {
		t.Errorf("tangent slope %.5f W/(m/s), want the least P_chem/V on the curve %.5f (±%.1f %%)", got, best, tol*100)
	}
	if step := r.Curve[1].SpeedMS; math.Abs(bestV-r.MaxRangeSpeedMS) > step {
		t.Errorf("least P_chem/V at %.2f m/s, V_mr %.2f m/s: more than a curve step (%.2f m/s) apart", bestV, r.MaxRangeSpeedMS, step)
	}
}

func TestPower_ErrNoData(t *testing.T) {
	if _, err := Power(PowerInput{}); !errors.Is(err, ErrNoData) {
		t.Errorf("Power(empty result) error %v, want ErrNoData", err)
	}
}
