package charts

import (
	"fmt"
	"time"

	"gonum.org/v1/plot"
)

// day is one day in seconds, the unit of the time axes' steps.
const day = 24 * 60 * 60

// dayTicks labels a time axis (values in Unix seconds) with dates at local
// midnight in Loc, at most Max labels, a step of whole days chosen from a
// short list so labels fall on round intervals; long spans get months.
type dayTicks struct {
	Loc *time.Location
	Max int
}

// daySteps are the label intervals tried, in days.
var daySteps = []int{1, 2, 3, 7, 14, 28, 56, 91, 182, 364}

// Ticks implements plot.Ticker. Spans over 120 days get month ticks.
func (t dayTicks) Ticks(lo, hi float64) []plot.Tick {
	span := (hi - lo) / day
	if span > 120 {
		return t.monthTicks(lo, hi)
	}
	first := midnightAfter(unixTime(lo, t.Loc))
	step := daySteps[len(daySteps)-1]
	for _, s := range daySteps {
		if span/float64(s) < float64(t.Max) {
			step = s
			break
		}
	}
	minor := 1
	if step >= 28 {
		minor = 7
	}
	var ticks []plot.Tick
	for i := 0; ; i += minor {
		d := first.AddDate(0, 0, i)
		v := float64(d.Unix())
		if v > hi {
			break
		}
		tk := plot.Tick{Value: v}
		if i%step == 0 {
			tk.Label = d.Format("2 Jan")
		}
		ticks = append(ticks, tk)
	}
	return ticks
}

// monthSteps are the label intervals of long spans, in months.
var monthSteps = []int{1, 2, 3, 6, 12, 24}

// monthTicks marks the first of each month, labelled "Oct", with the year
// on the first label and on January: "Jan 2027".
func (t dayTicks) monthTicks(lo, hi float64) []plot.Tick {
	start := unixTime(lo, t.Loc)
	first := time.Date(start.Year(), start.Month(), 1, 0, 0, 0, 0, t.Loc)
	if first.Before(start) {
		first = first.AddDate(0, 1, 0)
	}
	months := (hi - lo) / day / 30.44
	step := monthSteps[len(monthSteps)-1]
	for _, s := range monthSteps {
		if months/float64(s) < float64(t.Max) {
			step = s
			break
		}
	}
	var ticks []plot.Tick
	for i := 0; ; i++ {
		d := first.AddDate(0, i, 0)
		v := float64(d.Unix())
		if v > hi {
			break
		}
		tk := plot.Tick{Value: v}
		if i%step == 0 {
			tk.Label = d.Format("Jan")
			if i == 0 || d.Month() == time.January {
				tk.Label = d.Format("Jan 2006")
			}
		}
		ticks = append(ticks, tk)
	}
	return ticks
}

// unixTime converts seconds to a time in loc.
func unixTime(s float64, loc *time.Location) time.Time {
	return time.Unix(int64(s), 0).In(loc)
}

// midnightAfter returns the first midnight at or after t, in t's location.
func midnightAfter(t time.Time) time.Time {
	m := time.Date(t.Year(), t.Month(), t.Day(), 0, 0, 0, 0, t.Location())
	if m.Before(t) {
		m = m.AddDate(0, 0, 1)
	}
	return m
}

// dateLabel returns the label of a time axis from lo to hi: "Date (2026)"
// or "Date (2026–2027)", since tick labels carry no year.
func dateLabel(lo, hi time.Time) string {
	if lo.Year() == hi.Year() {
		return fmt.Sprintf("Date (%d)", lo.Year())
	}
	return fmt.Sprintf("Date (%d–%d)", lo.Year(), hi.Year())
}

// timeRange returns the x range of a time axis through ts (at least one)
// and now (ignored when zero or earlier): at least two days wide, centred
// on a single day, with a little room at both ends for the markers.
func timeRange(ts []time.Time, now time.Time) (lo, hi float64) {
	lo, hi = float64(ts[0].Unix()), float64(ts[0].Unix())
	for _, t := range ts[1:] {
		lo, hi = min(lo, float64(t.Unix())), max(hi, float64(t.Unix()))
	}
	if !now.IsZero() {
		hi = max(hi, float64(now.Unix()))
	}
	if hi-lo < 2*day {
		mid := (lo + hi) / 2
		lo, hi = mid-day, mid+day
	}
	pad := (hi - lo) * 0.03
	return lo - pad, hi + pad
}

// isoDate formats t as 2006-01-02, the date form of the text alternatives.
func isoDate(t time.Time) string { return t.Format("2006-01-02") }
