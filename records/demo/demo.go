// Package demo seeds an invented demo centre (testdata/demo/scenario.json)
// into a store, with every date relative to the day of seeding, and can
// generate large invented histories for load tests.
//
// Everything here is invented: the centre, its staff, its finders and its
// patients. The species are real, and every invented measurement is drawn
// to be consistent with the species' reference.
package demo

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"time"

	"aloft/assess"
	"aloft/records"
)

// Scenario is the demo centre as the JSON file describes it.
type Scenario struct {
	Centre   records.Centre `json:"centre"`
	Staff    []Person       `json:"staff"`
	Patients []Patient      `json:"patients"`
}

// Person is a demo login. Its password is public.
type Person struct {
	Username    string         `json:"username"`
	DisplayName string         `json:"display_name"`
	Password    string         `json:"password"`
	Roles       []records.Role `json:"roles"`
}

// Patient is one invented patient: intake details, then its history.
type Patient struct {
	Key             string     `json:"key"` // names the patient within the scenario
	Species         string     `json:"species"`
	AgeClass        string     `json:"age_class"`
	Sex             assess.Sex `json:"sex"`
	AdmittedDaysAgo int        `json:"admitted_days_ago"`
	FoundPlace      string     `json:"found_place"`
	FoundLat        *float64   `json:"found_lat"`
	FoundLon        *float64   `json:"found_lon"`
	FinderName      string     `json:"finder_name"`
	FinderContact   string     `json:"finder_contact"`
	Reason          string     `json:"reason"`
	IntakeCondition string     `json:"intake_condition"`
	IntakeMassG     float64    `json:"intake_mass_g"`
	By              string     `json:"by"` // username of the admitting person
	History         []Event    `json:"history"`
}

// Event is one record in a patient's history, Day days after admission
// (Hour o'clock that day), entered by By. Data's shape depends on Kind.
type Event struct {
	Kind string          `json:"kind"`
	Day  int             `json:"day"`
	Hour int             `json:"hour"`
	By   string          `json:"by"`
	Data json.RawMessage `json:"data"`
}

// Parse reads a scenario, refusing unknown fields (a typo must not silently
// drop demo data).
func Parse(b []byte) (*Scenario, error) {
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	var sc Scenario
	if err := dec.Decode(&sc); err != nil {
		return nil, fmt.Errorf("demo: scenario: %w", err)
	}
	return &sc, nil
}

// Load reads scenario.json from fsys, then every history-*.json beside it:
// each maps a patient key to more events (one file per record feature), which
// are merged into the patients' histories in day order.
func Load(fsys fs.FS) (*Scenario, error) {
	b, err := fs.ReadFile(fsys, "scenario.json")
	if err != nil {
		return nil, fmt.Errorf("demo: %w", err)
	}
	sc, err := Parse(b)
	if err != nil {
		return nil, err
	}
	names, err := fs.Glob(fsys, "history-*.json")
	if err != nil {
		return nil, err
	}
	byKey := map[string]*Patient{}
	for i := range sc.Patients {
		byKey[sc.Patients[i].Key] = &sc.Patients[i]
	}
	for _, name := range names {
		hb, err := fs.ReadFile(fsys, name)
		if err != nil {
			return nil, err
		}
		var more map[string][]Event
		dec := json.NewDecoder(bytes.NewReader(hb))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&more); err != nil {
			return nil, fmt.Errorf("demo: %s: %w", path.Base(name), err)
		}
		for key, evs := range more {
			p, ok := byKey[key]
			if !ok {
				return nil, fmt.Errorf("demo: %s: no patient %q", name, key)
			}
			p.History = append(p.History, evs...)
		}
	}
	for _, p := range byKey {
		sort.SliceStable(p.History, func(i, j int) bool {
			a, b := p.History[i], p.History[j]
			if a.Day != b.Day {
				return a.Day < b.Day
			}
			return a.Hour < b.Hour
		})
	}
	return sc, nil
}

// Seeded is what Seed made, for the event seeders.
type Seeded struct {
	Store    *records.Store
	Species  *assess.SpeciesTable
	Users    map[string]records.User // by username
	Patients map[string]records.Patient
	Now      time.Time
}

// At returns the instant of an event of a patient admitted at admitted.
func (sd *Seeded) At(admitted time.Time, ev Event) time.Time {
	day := time.Date(admitted.Year(), admitted.Month(), admitted.Day(), 0, 0, 0, 0, admitted.Location()).AddDate(0, 0, ev.Day)
	h := ev.Hour
	if h == 0 {
		h = 10
	}
	t := day.Add(time.Duration(h) * time.Hour)
	if t.After(sd.Now) {
		t = sd.Now.Add(-time.Minute)
	}
	return t
}

// UserID returns the id of a demo username (0 when unknown: the system).
func (sd *Seeded) UserID(username string) int64 { return sd.Users[username].ID }

// eventSeeder stores one event of one patient.
type eventSeeder func(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error

// Seed writes the scenario into an empty store, as a demo centre, with all
// dates relative to now.
func Seed(ctx context.Context, store *records.Store, species *assess.SpeciesTable, sc *Scenario, now time.Time) error {
	if n, err := store.CountUsers(ctx); err != nil || n > 0 {
		if err != nil {
			return err
		}
		return fmt.Errorf("demo: the database already has users: seed only a new database")
	}
	c := sc.Centre
	c.IsDemo = true
	if err := store.SetCentre(ctx, 0, c); err != nil {
		return fmt.Errorf("demo: centre: %w", err)
	}
	sd := &Seeded{Store: store, Species: species, Users: map[string]records.User{}, Patients: map[string]records.Patient{}, Now: now}
	for _, p := range sc.Staff {
		u, err := store.AddUser(ctx, 0, records.NewUser{Username: p.Username, DisplayName: p.DisplayName, Password: p.Password, Roles: p.Roles})
		if err != nil {
			return fmt.Errorf("demo: user %s: %w", p.Username, err)
		}
		sd.Users[p.Username] = u
	}
	if err := seedSettings(ctx, sd); err != nil {
		return fmt.Errorf("demo: settings: %w", err)
	}
	seeders := eventSeeders()
	for _, dp := range sc.Patients {
		p, err := admit(ctx, sd, dp)
		if err != nil {
			return fmt.Errorf("demo: patient %s: %w", dp.Key, err)
		}
		for i, ev := range dp.History {
			fn, ok := seeders[ev.Kind]
			if !ok {
				return fmt.Errorf("demo: patient %s event %d: unknown kind %q", dp.Key, i, ev.Kind)
			}
			if err := fn(ctx, sd, p, ev); err != nil {
				return fmt.Errorf("demo: patient %s event %d (%s): %w", dp.Key, i, ev.Kind, err)
			}
			if fresh, err := store.Patient(ctx, p.ID); err == nil {
				p = fresh
			}
		}
		sd.Patients[dp.Key] = p
	}
	return nil
}

func admit(ctx context.Context, sd *Seeded, dp Patient) (records.Patient, error) {
	sp, err := sd.Species.Find(dp.Species)
	if err != nil {
		return records.Patient{}, err
	}
	at := sd.Now.AddDate(0, 0, -dp.AdmittedDaysAgo).Truncate(time.Hour)
	if at.Hour() < 8 {
		at = at.Add(time.Duration(9-at.Hour()) * time.Hour)
	}
	if at.After(sd.Now) {
		at = sd.Now.Add(-time.Hour)
	}
	found := at
	if dp.AdmittedDaysAgo > 0 && at.Hour() < 12 {
		found = at.AddDate(0, 0, -1)
	}
	return sd.Store.AdmitPatient(ctx, sd.UserID(dp.By), records.PatientInput{
		SpeciesScientific: sp.ScientificName, SpeciesCommon: sp.CommonName, AgeClass: dp.AgeClass, Sex: dp.Sex,
		FoundDate: found.Format(records.DateLayout), FoundPlace: dp.FoundPlace, FoundLat: dp.FoundLat, FoundLon: dp.FoundLon,
		FinderName: dp.FinderName, FinderContact: dp.FinderContact, Reason: dp.Reason, IntakeCondition: dp.IntakeCondition,
		IntakeMassG: dp.IntakeMassG, AdmittedAt: at,
	})
}
