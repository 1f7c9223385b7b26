package records_test

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// TestReleaseSites_AddUpdateRetire: sites are added, found by name in any
// case, updated with their version, retired (hidden from the list, still
// found by name), each change audited; names are unique and elevations
// within the flight model's range.
func TestReleaseSites_AddUpdateRetire(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	rehab := recordstest.AddUser(t, s, "rae", records.RoleRehabilitator)
	low, err := s.AddReleaseSite(ctx, rehab.ID, records.ReleaseSiteInput{Name: " Estuary Lookout ", ElevationM: 3})
	if err != nil {
		t.Fatal(err)
	}
	up, err := s.AddReleaseSite(ctx, rehab.ID, records.ReleaseSiteInput{Name: "High Moor", ElevationM: 1000, Notes: "open heath"})
	if err != nil {
		t.Fatal(err)
	}
	if low.Name != "Estuary Lookout" || low.Version != 1 {
		t.Errorf("added: got %+v", low)
	}
	got, err := s.ReleaseSiteByName(ctx, "high moor")
	if err != nil || got.ID != up.ID {
		t.Fatalf("by name: got %+v %v", got, err)
	}
	// U.S. Standard Atmosphere 1976 table: 1.1117 kg/m³ at 1000 m
	// (SCIENCE.md §1, tolerance 2·10⁻⁴).
	if rho, _ := got.Site(nil).Density(); math.Abs(rho-1.1117) > 2e-4 {
		t.Errorf("air density at the site: got %.5f, want 1.1117", rho)
	}
	errCases := []struct {
		name  string
		in    records.ReleaseSiteInput
		field string
	}{
		{"ErrNameTaken", records.ReleaseSiteInput{Name: "HIGH MOOR", ElevationM: 10}, "name"},
		{"ErrNoName", records.ReleaseSiteInput{Name: "  ", ElevationM: 10}, "name"},
		{"ErrTooHigh", records.ReleaseSiteInput{Name: "Summit", ElevationM: 6000}, "elevation_m"},
		{"ErrTooLow", records.ReleaseSiteInput{Name: "Pit", ElevationM: -501}, "elevation_m"},
	}
	for _, tc := range errCases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := s.AddReleaseSite(ctx, rehab.ID, tc.in)
			var ves assess.ValidationErrors
			if !errors.As(err, &ves) || ves.Field(tc.field) == "" {
				t.Errorf("got %v, want a validation error on %s", err, tc.field)
			}
		})
	}
	up2, err := s.UpdateReleaseSite(ctx, rehab.ID, up.ID, 1, records.ReleaseSiteInput{Name: "High Moor", ElevationM: 910, Retired: true})
	if err != nil || up2.Version != 2 || !up2.Retired {
		t.Fatalf("update: got %+v %v", up2, err)
	}
	if _, err := s.UpdateReleaseSite(ctx, rehab.ID, up.ID, 1, records.ReleaseSiteInput{Name: "High Moor", ElevationM: 900}); !errors.Is(err, records.ErrConflict) {
		t.Errorf("stale version: got %v, want ErrConflict", err)
	}
	active, _ := s.ReleaseSites(ctx, false)
	all, _ := s.ReleaseSites(ctx, true)
	if len(active) != 1 || len(all) != 2 || all[1].Name != "High Moor" {
		t.Errorf("lists: %d active, %d in all", len(active), len(all))
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{Entity: "release_site"})
	if len(audit) != 3 || audit[0].Action != records.ActionUpdate {
		t.Errorf("audit: got %d rows", len(audit))
	}
	if _, err := s.ReleaseSiteByName(ctx, "Nowhere"); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("unknown name: got %v, want ErrNotFound", err)
	}
}

// TestReleaseSites_AssessAtSite: a patient assessed at a named upland site
// gets that site's air density and a lower healthy margin than at sea level
// (SCIENCE.md §5: a higher site lowers the healthy margin at the site).
func TestReleaseSites_AssessAtSite(t *testing.T) {
	ctx := context.Background()
	s, admin, p := settingsMallard(t)
	site, err := s.AddReleaseSite(ctx, admin.ID, records.ReleaseSiteInput{Name: "Ridge Tarn", ElevationM: 2000})
	if err != nil {
		t.Fatal(err)
	}
	at := site.Site(nil)
	now := recordstest.Epoch.Add(24 * time.Hour)
	high, err := s.Assess(ctx, p, &at, now)
	if err != nil {
		t.Fatal(err)
	}
	sea := assess.Site{}
	low, _ := s.Assess(ctx, p, &sea, now)
	// U.S. Standard Atmosphere 1976: 1.0066 kg/m³ at 2000 m.
	if math.Abs(high.Site.AirDensityKgM3-1.0066) > 2e-4 {
		t.Errorf("density: got %.5f, want 1.0066", high.Site.AirDensityKgM3)
	}
	if high.Physics == nil || low.Physics == nil || !(high.Physics.ExpectedMarginSite < low.Physics.ExpectedMarginSite) {
		t.Error("the healthy margin at 2000 m is not below the one at sea level")
	}
}
