package assess

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
	"time"
)

// failWriter fails every write.
type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestEncodeAssessment(t *testing.T) {
	at := time.Date(2026, 6, 20, 12, 0, 0, 0, time.UTC)
	margin := 0.42
	a := Assessment{
		Outcome:     Outcome{Level: OutcomeContinue, Label: OutcomeLabel(OutcomeContinue)},
		Criteria:    []Criterion{{ID: CritPowerMargin, Title: "Spare flight power", Status: StatusBorderline, Threshold: "margin ratio < 1 & > 0.5"}},
		Physics:     &Physics{FlightResult: FlightResult{ExcessPowerFraction: &margin}},
		Site:        SiteUsed{ElevationM: 140, AirDensityKgM3: 1.2086},
		EvaluatedAt: at,
	}
	var one, two bytes.Buffer
	if err := EncodeAssessment(&one, a); err != nil {
		t.Fatal(err)
	}
	if err := EncodeAssessment(&two, a); err != nil {
		t.Fatal(err)
	}
	out := one.String()
	checks := []struct {
		name string
		ok   bool
	}{
		{"SameBytesTwice", out == two.String()},
		{"EndsWithOneNewline", strings.HasSuffix(out, "}\n") && !strings.HasSuffix(out, "\n\n")},
		{"IndentedTwoSpaces", strings.HasPrefix(out, "{\n  \"outcome\": {\n    \"level\": \"continue\"")},
		{"HTMLCharactersAsWritten", strings.Contains(out, `"margin ratio < 1 & > 0.5"`)},
		{"TimeRFC3339", strings.Contains(out, `"evaluated_at": "2026-06-20T12:00:00Z"`)},
	}
	for _, c := range checks {
		if !c.ok {
			t.Errorf("%s: not so in\n%.400s", c.name, out)
		}
	}
	var back Assessment
	if err := json.Unmarshal(one.Bytes(), &back); err != nil {
		t.Fatalf("does not read back: %v", err)
	}
	if back.Outcome.Level != OutcomeContinue || *back.Physics.ExcessPowerFraction != margin || !back.EvaluatedAt.Equal(at) {
		t.Errorf("read back %+v", back.Outcome)
	}
}

func TestEncodeAssessment_Errors(t *testing.T) {
	nan := math.NaN()
	bad := Assessment{Physics: &Physics{FlightResult: FlightResult{StillAirRangeKm: &nan}}}
	var buf bytes.Buffer
	if err := EncodeAssessment(&buf, bad); err == nil || buf.Len() != 0 {
		t.Errorf("NaN: err %v, %d bytes written; want an error and nothing written", err, buf.Len())
	}
	if err := EncodeAssessment(failWriter{}, Assessment{}); err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Errorf("failing writer: err %v", err)
	}
}
