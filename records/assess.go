package records

import (
	"context"
	"fmt"
	"time"

	"aloft/assess"
)

// Thresholds returns the assessment thresholds in force at the centre: the
// defaults with the centre's own settings applied (each with provenance
// centre-setting, who and when). A stored setting that can no longer be
// applied is left out: the default stands, and the settings page says so.
func (s *Store) Thresholds(ctx context.Context) (assess.Thresholds, error) {
	list, err := s.ThresholdSettings(ctx)
	if err != nil {
		return assess.Thresholds{}, err
	}
	th, _ := ApplyThresholdSettings(list)
	return th, nil
}

// DefaultSite is the centre's own elevation with the standard atmosphere:
// the release site when none is named.
func (s *Store) DefaultSite(ctx context.Context) (assess.Site, string, error) {
	c, err := s.Centre(ctx)
	if err != nil {
		return assess.Site{}, "", fmt.Errorf("records: default site: %w", err)
	}
	return assess.Site{ElevationM: c.ElevationM}, c.Name + " (centre)", nil
}

// Assess evaluates patient p with the centre's thresholds at site (nil: the
// centre's elevation) at time now. It is the one path from the store to
// assess.Evaluate, used by the pages, the API, the report and the command line.
func (s *Store) Assess(ctx context.Context, p Patient, site *assess.Site, now time.Time) (assess.Assessment, error) {
	sp, err := s.SpeciesFor(ctx, p.SpeciesScientific)
	if err != nil {
		return assess.Assessment{}, err
	}
	in, err := s.CaseInputs(ctx, p)
	if err != nil {
		return assess.Assessment{}, err
	}
	th, err := s.Thresholds(ctx)
	if err != nil {
		return assess.Assessment{}, err
	}
	st := site
	if st == nil {
		d, _, err := s.DefaultSite(ctx)
		if err != nil {
			return assess.Assessment{}, err
		}
		st = &d
	}
	a, err := assess.Evaluate(in, sp, th, *st, now)
	if err != nil {
		return assess.Assessment{}, fmt.Errorf("records: assess %s: %w", p.CaseNumber, err)
	}
	return a, nil
}
