package charts

import (
	"math"
	"strconv"
	"strings"
)

// grams formats a mass in grams as staff read it: whole grams from 100 g,
// one decimal below (a swift's 37.6 g), two below 10 g.
func grams(g float64) string {
	switch {
	case g >= 100:
		return strconv.FormatFloat(math.Round(g), 'f', 0, 64)
	case g >= 10:
		return trimZeros(strconv.FormatFloat(g, 'f', 1, 64))
	default:
		return trimZeros(strconv.FormatFloat(g, 'f', 2, 64))
	}
}

// sig3 formats a positive quantity to three significant figures without an
// exponent: 0.312, 12.3, 215, 1230.
func sig3(v float64) string {
	if math.Abs(v) >= 100 {
		return strconv.FormatFloat(math.Round(v), 'f', 0, 64)
	}
	return strconv.FormatFloat(v, 'g', 3, 64)
}

// oneDecimal formats a speed or similar to one decimal place.
func oneDecimal(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }

// trimZeros removes trailing zeros after a decimal point, and the point.
func trimZeros(s string) string {
	if !strings.Contains(s, ".") {
		return s
	}
	return strings.TrimRight(strings.TrimRight(s, "0"), ".")
}

// plural returns "1 pass" or "3 passes" style counts.
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}
