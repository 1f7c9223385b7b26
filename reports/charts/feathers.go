package charts

import (
	"fmt"
	"slices"
	"strings"

	"aloft/assess"

	"gonum.org/v1/plot/vg"
)

// FeatherInput is what the feather chart shows: the flight feathers of both
// wings and the tail, and how many of each the species has.
type FeatherInput struct {
	// Map is the examined state of each feather (assess.FeatherMap: index 0
	// is P1, the innermost primary; S1, the outermost secondary; R1, the
	// central rectrix of each side). A feather the map does not reach is
	// drawn as not recorded.
	Map assess.FeatherMap
	// Primaries and Secondaries are the species' counts per wing, and
	// Rectrices its count for the whole tail (Species.Primaries, …); a
	// longer slice in Map wins.
	Primaries, Secondaries, Rectrices int
}

// Feathers returns the flight-feather chart: the left wing, the right wing
// and the tail, seen from above, each feather drawn as a feather and
// numbered. A feather's state shows three ways, so colour is never the only
// carrier: its colour, its shape (a broken feather is cut short, a missing
// one is a dashed outline, a growing one narrow and short) and a letter
// under its tip; the legend says each in words.
func Feathers(in FeatherInput) (*Chart, error) {
	f := newFeatherChart(in)
	if f.total() == 0 {
		return nil, fmt.Errorf("charts: feather chart: no feathers to draw: %w", ErrNoData)
	}
	w := vg.Length(360)
	return &Chart{name: "feathers", title: "Flight feathers", alt: f.alt(),
		width: w, height: f.naturalHeight(w, ScreenStyle()), draw: f.draw}, nil
}

// notRecorded marks a feather the map does not reach.
const notRecorded assess.FeatherStatus = ""

// featherTrack is one side of one feather tract: the left primaries, the
// right tail, …, in the map's order (index 0 is number 1).
type featherTrack struct {
	prefix string // P, S or R
	states []assess.FeatherStatus
}

// track returns the first n states of s (n at least len(s)), the rest not recorded.
func track(prefix string, s []assess.FeatherStatus, n int) featherTrack {
	states := make([]assess.FeatherStatus, max(n, len(s)))
	copy(states, s)
	return featherTrack{prefix: prefix, states: states}
}

// featherChart is a FeatherInput with every tract padded to its count.
type featherChart struct {
	leftP, leftS, rightP, rightS, tailL, tailR featherTrack
}

func newFeatherChart(in FeatherInput) featherChart {
	m, perSide := in.Map, (in.Rectrices+1)/2
	return featherChart{
		leftP: track("P", m.LeftPrimaries, in.Primaries), leftS: track("S", m.LeftSecondaries, in.Secondaries),
		rightP: track("P", m.RightPrimaries, in.Primaries), rightS: track("S", m.RightSecondaries, in.Secondaries),
		tailL: track("R", m.TailLeft, perSide), tailR: track("R", m.TailRight, perSide),
	}
}

func (f featherChart) total() int {
	n := 0
	for _, t := range []featherTrack{f.leftP, f.leftS, f.rightP, f.rightS, f.tailL, f.tailR} {
		n += len(t.states)
	}
	return n
}

// statusWords names each state in the legend and the text alternative.
func statusWords(s assess.FeatherStatus) string {
	switch s {
	case notRecorded:
		return "not recorded"
	case assess.FeatherPin:
		return "growing (pin or blood feather)"
	case assess.FeatherStressBars:
		return "stress bars"
	}
	return string(s)
}

// alt returns the text alternative: per wing and the tail, which feathers
// are in which state, the rest intact.
func (f featherChart) alt() string {
	wing := func(side string, p, s featherTrack) string {
		head := fmt.Sprintf("%s wing, %s and %s", side, plural(len(p.states), "primary", "primaries"),
			plural(len(s.states), "secondary", "secondaries"))
		return tractAlt(head, namedTrack{"P", p}, namedTrack{"S", s})
	}
	tail := tractAlt("Tail, "+plural(len(f.tailL.states)+len(f.tailR.states), "rectrix", "rectrices"),
		namedTrack{"left R", f.tailL}, namedTrack{"right R", f.tailR})
	return strings.Join([]string{wing("Left", f.leftP, f.leftS), wing("Right", f.rightP, f.rightS), tail}, " ")
}

// namedTrack is a track with the label its feathers are named by: "P" gives
// P1, P2…; "left R" gives left R1….
type namedTrack struct {
	label string
	featherTrack
}

// tractAlt lists the feathers of tracks that are not intact, grouped by
// state in legend order.
func tractAlt(head string, tracks ...namedTrack) string {
	byState := map[assess.FeatherStatus][]string{}
	intact := 0
	for _, t := range tracks {
		for i, s := range t.states {
			if s == assess.FeatherIntact {
				intact++
				continue
			}
			byState[s] = append(byState[s], fmt.Sprintf("%s%d", t.label, i+1))
		}
	}
	var items []string
	for _, s := range legendOrder(byState) {
		items = append(items, statusWords(s)+" "+strings.Join(byState[s], ", "))
	}
	switch {
	case len(items) == 0 && intact == 0:
		return head + "."
	case len(items) == 0:
		return head + ": all intact."
	case intact == 0:
		return head + ": " + strings.Join(items, "; ") + "."
	}
	return head + ": " + strings.Join(items, "; ") + "; the rest intact."
}

// legendOrder returns the states present in set other than intact, in the
// order of assess.FeatherStatuses, then not recorded, then any unknown
// state in alphabetical order.
func legendOrder[V any](set map[assess.FeatherStatus]V) []assess.FeatherStatus {
	var out []assess.FeatherStatus
	for _, s := range assess.FeatherStatuses {
		if _, ok := set[s]; ok && s != assess.FeatherIntact {
			out = append(out, s)
		}
	}
	if _, ok := set[notRecorded]; ok {
		out = append(out, notRecorded)
	}
	var unknown []assess.FeatherStatus
	for s := range set {
		if s != notRecorded && !s.Valid() {
			unknown = append(unknown, s)
		}
	}
	slices.Sort(unknown)
	return append(out, unknown...)
}
