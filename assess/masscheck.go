package assess

import (
	"fmt"
	"strconv"
)

// MassCheck is the finding of CheckMass about a mass typed for a patient.
type MassCheck struct {
	ValidationError
	// NeedsConfirm: below half the range's lower bound or above 1.6 times its
	// upper bound — refused unless the person confirms it with a reason.
	NeedsConfirm bool
	// OutsideRange: outside the species' range but not absurdly so — accepted
	// and flagged.
	OutsideRange bool
}

// Mass plausibility factors [project default]: a mass under half the
// species' lower bound or over 1.6 times its upper bound is more likely a
// typing or unit mistake than a real bird.
const (
	MassConfirmLowFactor  = 0.5
	MassConfirmHighFactor = 1.6
)

// CheckMass compares a mass in grams with the species' typical range for the
// sex. It returns nil when the mass is within the range. The message names
// the field, the value, the range and the likely mistake.
func CheckMass(field string, g float64, sp *Species, sex Sex) *MassCheck {
	lo, hi := sp.MassRangeG(sex)
	if lo <= 0 || hi <= 0 || (g >= lo && g <= hi) {
		return nil
	}
	v := strconv.FormatFloat(g, 'f', -1, 64)
	rng := fmt.Sprintf("%s to %s g", fmtG(lo), fmtG(hi))
	who := sp.CommonName
	if sex == SexFemale || sex == SexMale {
		who = string(sex) + " " + sp.CommonName
	}
	mc := &MassCheck{ValidationError: ValidationError{Field: field, Value: v}}
	switch {
	case g < lo*MassConfirmLowFactor:
		mc.NeedsConfirm = true
		mc.Message = fmt.Sprintf("%s g is far below the range of a %s (%s): did you mean kilograms (%s g)? If the mass is right, confirm it and say why.",
			v, who, rng, fmtG(g*1000))
	case g > hi*MassConfirmHighFactor:
		mc.NeedsConfirm = true
		mc.Message = fmt.Sprintf("%s g is far above the range of a %s (%s): check the unit and the digits (weighed in its box?). If the mass is right, confirm it and say why.",
			v, who, rng)
	default:
		mc.OutsideRange = true
		mc.Message = fmt.Sprintf("%s g is outside the usual range of a %s (%s): recorded and flagged.", v, who, rng)
	}
	return mc
}

func fmtG(g float64) string {
	if g >= 100 {
		return strconv.FormatFloat(g, 'f', 0, 64)
	}
	return strconv.FormatFloat(g, 'g', 3, 64)
}
