package assess

import (
	"fmt"
	"strings"
)

// Params are the constants of the power-curve model (SCIENCE.md §3). Every
// result carries the set it was computed with, so a figure can always be
// traced to its constants.
type Params struct {
	// Name of the set, e.g. "pennycuick2008"; free text for a custom set.
	Name string `json:"name"`
	// K is the induced power factor, dimensionless, valid 0.5–3.
	K float64 `json:"k"`
	// CDb is the body drag coefficient on the frontal area, valid (0, 1].
	CDb float64 `json:"c_db"`
	// CPro is the profile power constant, valid [0, 50].
	CPro float64 `json:"c_pro"`
	// Eta is the flight-muscle efficiency, mechanical over chemical power,
	// valid (0, 1].
	Eta float64 `json:"eta"`
	// R is the respiration and circulation factor, valid [1, 2].
	R float64 `json:"r"`
}

// Names of the published parameter sets.
const (
	ParamsPennycuick2008 = "pennycuick2008"
	ParamsPennycuick2013 = "pennycuick2013"
)

// ParamSetNames lists the named parameter sets, the default first.
var ParamSetNames = []string{ParamsPennycuick2008, ParamsPennycuick2013}

// ParamSet returns the named parameter set; "" means the default,
// pennycuick2008.
//
// pennycuick2008 ("Pennycuick 2008 values"): k 1.2, C_Db 0.1, C_pro 8.4,
// η 0.23, R 1.1. pennycuick2013: the same with k 0.9; that paper also varies
// C_Db with Reynolds number (0.06–0.12), which this set simplifies to 0.1.
// C_Db 0.1, C_pro 8.4 and R 1.1 are marked from memory in SCIENCE.md §3.
//
// References:
//   - Pennycuick, C.J. 2008. Modelling the Flying Bird. Academic Press (from memory).
//   - Pennycuick, C.J., Åkesson, S. & Hedenström, A. 2013. J. R. Soc. Interface 10:20130419.
//   - Pennycuick, C.J., Klaassen, M., Kvist, A. & Lindström, Å. 1996. J. Exp. Biol. 199:2757.
//   - Ward, S. et al. 2001. J. Exp. Biol. 204:3311.
func ParamSet(name string) (Params, error) {
	switch strings.TrimSpace(strings.ToLower(name)) {
	case "", ParamsPennycuick2008:
		return Params{Name: ParamsPennycuick2008, K: 1.2, CDb: 0.1, CPro: 8.4, Eta: 0.23, R: 1.1}, nil
	case ParamsPennycuick2013:
		return Params{Name: ParamsPennycuick2013, K: 0.9, CDb: 0.1, CPro: 8.4, Eta: 0.23, R: 1.1}, nil
	}
	return Params{}, &ValidationError{Field: "params", Value: name,
		Message: "expected one of " + strings.Join(ParamSetNames, ", ")}
}

// defaultParams is the default set; ParamSet("") cannot fail.
func defaultParams() Params {
	p, _ := ParamSet("")
	return p
}

// Validate reports a *ValidationError (field "params") when a constant is
// outside the range documented on its field, NaN or infinite.
func (p Params) Validate() error {
	checks := []struct {
		name   string
		v      float64
		lo, hi float64
		loOpen bool
	}{
		{"k", p.K, 0.5, 3, false},
		{"c_db", p.CDb, 0, 1, true},
		{"c_pro", p.CPro, 0, 50, false},
		{"eta", p.Eta, 0, 1, true},
		{"r", p.R, 1, 2, false},
	}
	for _, c := range checks {
		low := c.v >= c.lo
		if c.loOpen {
			low = c.v > c.lo
		}
		if !low || !(c.v <= c.hi) {
			return &ValidationError{Field: "params", Value: fmt.Sprintf("%s=%g", c.name, c.v),
				Message: fmt.Sprintf("parameter %s must be in %s%g, %g]", c.name, bracket(c.loOpen), c.lo, c.hi)}
		}
	}
	return nil
}

func bracket(open bool) string {
	if open {
		return "("
	}
	return "["
}
