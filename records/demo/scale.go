package demo

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"time"

	"aloft/assess"
	"aloft/records"
)

// Scale seeding: thousands of invented historical patients with full
// histories, for load tests. Each patient's history is planned (drawn, built,
// checked by the same validators a form runs, and marshalled) by a pool of
// goroutines, and written in order through records.Batch, a few hundred
// patients per transaction. Every record is invented.

// scaleChunk is how many patients one transaction writes (a few thousand
// records: big enough that commits cost little, small enough that a server
// reading the same file is not starved of the write lock for long).
const scaleChunk = 100

// scaleYears is how far back the invented admissions reach.
const scaleYears = 10

// SeedScale adds n invented historical patients admitted over the ten years
// before now, each with a full history (weigh-ins, condition scores, wings,
// housing, trials, flight sessions, waterproofing, clinical records,
// clearances) and, for most, a disposition; a few hundred stay in care. It
// needs the demo centre (Seed) first: its staff enter the records and its
// enclosures house the birds. The same n and now give the same centre.
func SeedScale(ctx context.Context, store *records.Store, species *assess.SpeciesTable, n int, now time.Time) error {
	if n <= 0 {
		return nil
	}
	env, err := newScaleEnv(ctx, store, species, now)
	if err != nil {
		return err
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel() // stops the planners when writing fails
	admitted := scaleAdmissions(n, now)
	chunks := (n + scaleChunk - 1) / scaleChunk
	plans, done := scalePlanAll(ctx, env, admitted, chunks)
	for c := 0; c < chunks; c++ {
		res := <-plans[c]
		done()
		if res.err != nil {
			return res.err
		}
		if err := store.Batch(ctx, func(b *records.Batch) error { return env.write(b, res.plans) }); err != nil {
			return fmt.Errorf("demo: scale patients %d–%d: %w", c*scaleChunk, c*scaleChunk+len(res.plans)-1, err)
		}
	}
	return nil
}

// scaleResult is one chunk of planned patients.
type scaleResult struct {
	plans []scalePlan
	err   error
}

// scalePlanAll plans the chunks on a pool of goroutines and returns one
// channel per chunk, in order. The writer calls done after taking each
// chunk: planning runs at most a few chunks ahead of it, which bounds the
// memory held. Cancelling ctx stops the planners.
func scalePlanAll(ctx context.Context, env *scaleEnv, admitted []time.Time, chunks int) (out []chan scaleResult, done func()) {
	out = make([]chan scaleResult, chunks)
	for c := range out {
		out[c] = make(chan scaleResult, 1)
	}
	workers := max(runtime.GOMAXPROCS(0), 1)
	ahead := make(chan struct{}, 2*workers) // bounds memory: chunks planned but not yet written
	jobs := make(chan int)
	go func() {
		defer close(jobs)
		for c := 0; c < chunks; c++ {
			select {
			case ahead <- struct{}{}:
			case <-ctx.Done():
				return
			}
			jobs <- c
		}
	}()
	for w := 0; w < workers; w++ {
		go func() {
			for c := range jobs {
				lo, hi := c*scaleChunk, min((c+1)*scaleChunk, len(admitted))
				res := scaleResult{plans: make([]scalePlan, 0, hi-lo)}
				for i := lo; i < hi && res.err == nil; i++ {
					p, err := env.plan(i, len(admitted), admitted[i])
					res.plans, res.err = append(res.plans, p), err
				}
				out[c] <- res // buffered: never blocks
			}
		}()
	}
	return out, func() { <-ahead }
}

// write stores a chunk of planned patients in batch b.
func (env *scaleEnv) write(b *records.Batch, plans []scalePlan) error {
	for _, pl := range plans {
		p, err := b.Admit(pl.by, pl.intake)
		if err != nil {
			return fmt.Errorf("admit %s: %w", pl.intake.SpeciesCommon, err)
		}
		for _, r := range pl.recs {
			if r.clear != nil {
				_, err = b.SetClearanceAt(env.users["vet"], p.ID, r.at, r.clear.item, r.clear.state, r.clear.note)
			} else {
				_, err = b.AddEntry(r.by, records.NewEntry{PatientID: p.ID, Kind: r.kind, At: r.at, Data: r.data})
			}
			if err != nil {
				return fmt.Errorf("%s %s of %s: %w", r.kind, r.at.Format(time.RFC3339), p.CaseNumber, err)
			}
		}
		if pl.disp != nil {
			if _, err := b.Dispose(pl.dispBy, p.ID, *pl.disp); err != nil {
				return fmt.Errorf("dispose %s (%s): %w", p.CaseNumber, pl.disp.Kind, err)
			}
		}
	}
	return nil
}

// scaleEnv is what planning needs: the clock, the species, the staff and
// the enclosures.
type scaleEnv struct {
	now        time.Time
	species    map[string]*assess.Species // by scientific name
	users      map[string]records.User    // demo username → account
	enclosures map[string]records.Enclosure
}

// scaleStaff are the demo accounts the invented history is entered by.
var scaleStaff = []string{"staff", "volunteer", "vet", "rehab"}

func newScaleEnv(ctx context.Context, store *records.Store, species *assess.SpeciesTable, now time.Time) (*scaleEnv, error) {
	env := &scaleEnv{now: now, species: map[string]*assess.Species{}, users: map[string]records.User{}, enclosures: map[string]records.Enclosure{}}
	for _, name := range scaleStaff {
		u, err := store.UserByName(ctx, name)
		if err != nil {
			return nil, fmt.Errorf("demo: scale seeding needs the demo centre's staff (seed the demo first): %s: %w", name, err)
		}
		env.users[name] = u
	}
	encs, err := store.Enclosures(ctx, true)
	if err != nil {
		return nil, err
	}
	for _, e := range encs {
		env.enclosures[e.Name] = e
	}
	for _, prof := range scaleProfiles {
		sp, err := species.Find(prof.scientific)
		if err != nil {
			return nil, fmt.Errorf("demo: scale species: %w", err)
		}
		env.species[prof.scientific] = sp
		for _, name := range []string{prof.indoor, prof.outdoor, prof.flight} {
			if _, ok := env.enclosures[name]; name != "" && !ok {
				return nil, fmt.Errorf("demo: scale seeding needs the demo centre's enclosure %q (seed the demo first)", name)
			}
		}
	}
	return env, nil
}

// scaleAdmissions draws n admission instants over the ten years before now,
// oldest first: more in the breeding season (young birds) and more in later
// years (a growing centre), each between 08:00 and 19:00.
func scaleAdmissions(n int, now time.Time) []time.Time {
	rng := rand.New(rand.NewPCG(20261202, uint64(n)))
	span := float64(scaleYears) * 365.25 * 24 * float64(time.Hour)
	out := make([]time.Time, 0, n)
	for len(out) < n {
		back := time.Duration(rng.Float64() * span)
		t := now.Add(-back)
		season := scaleSeason[t.Month()-1]
		growth := 0.6 + 0.4*(1-float64(back)/span)
		if rng.Float64() > season*growth {
			continue
		}
		day := time.Date(t.Year(), t.Month(), t.Day(), 8, 0, 0, 0, now.Location())
		t = day.Add(time.Duration(rng.IntN(11*60)) * time.Minute)
		if t.After(now.Add(-time.Hour)) {
			continue
		}
		out = append(out, t)
	}
	slices.SortFunc(out, func(a, b time.Time) int { return a.Compare(b) })
	return out
}

// scaleSeason weights admissions by month, January first: the breeding
// season brings the most (an invented curve for the demo).
var scaleSeason = [12]float64{0.35, 0.35, 0.45, 0.65, 0.9, 1.0, 1.0, 0.9, 0.7, 0.5, 0.4, 0.35}

// scaleRec is one planned record; clear is set for a clearance change.
type scaleRec struct {
	kind  records.Kind
	at    time.Time
	by    int64
	data  json.RawMessage
	clear *scaleClear
}

type scaleClear struct {
	item  assess.ClearanceItem
	state assess.ClearanceState
	note  string
}

// scalePlan is one invented patient: the intake, its records in time
// order, and its disposition (nil while in care).
type scalePlan struct {
	by     int64
	intake records.PatientInput
	recs   []scaleRec
	disp   *records.DispositionInput
	dispBy int64
}

// round rounds x to d decimals.
func round(x float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(x*p) / p
}
