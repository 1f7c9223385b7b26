// Package recordstest opens real SQLite stores for tests, with a fixed clock
// and cheap password hashing.
package recordstest

import (
	"context"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"golang.org/x/crypto/bcrypt"

	"aloft/records"
)

// Clock is a settable clock for tests.
type Clock struct {
	mu sync.Mutex
	t  time.Time
}

// NewClock starts a clock at t.
func NewClock(t time.Time) *Clock { return &Clock{t: t} }

// Now returns the clock's time.
func (c *Clock) Now() time.Time {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.t
}

// Advance moves the clock forward by d.
func (c *Clock) Advance(d time.Duration) {
	c.mu.Lock()
	c.t = c.t.Add(d)
	c.mu.Unlock()
}

// Epoch is the fixed start of test clocks.
var Epoch = time.Date(2026, 6, 15, 9, 0, 0, 0, time.UTC)

// Open opens a fresh store in t.TempDir() with clock (nil: a new Clock at Epoch).
func Open(t testing.TB, clock *Clock) *records.Store {
	t.Helper()
	if clock == nil {
		clock = NewClock(Epoch)
	}
	s, err := records.Open(context.Background(), filepath.Join(t.TempDir(), "aloft.db"),
		records.Options{Now: clock.Now, BcryptCost: bcrypt.MinCost})
	if err != nil {
		t.Fatalf("open store: %v", err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// Password is the password of every user made by AddUser.
const Password = "correct horse battery"

// AddUser adds a user with the given roles and returns it.
func AddUser(t testing.TB, s *records.Store, username string, roles ...records.Role) records.User {
	t.Helper()
	u, err := s.AddUser(context.Background(), 0, records.NewUser{Username: username, DisplayName: "Test " + username,
		Password: Password, Roles: roles})
	if err != nil {
		t.Fatalf("add user %s: %v", username, err)
	}
	return u
}

// Intake returns a valid intake for species (scientific name) at massG.
func Intake(species, common string, massG float64) records.PatientInput {
	return records.PatientInput{SpeciesScientific: species, SpeciesCommon: common, AgeClass: "adult",
		Sex: "unknown", FoundDate: Epoch.Format(records.DateLayout), FoundPlace: "Test meadow",
		Reason: "found grounded", IntakeMassG: massG}
}
