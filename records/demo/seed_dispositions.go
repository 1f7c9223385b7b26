package demo

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"

	"aloft/assess"
	"aloft/records"
)

// dispositionEvent is a "disposition" event's data: what became of the
// patient, dated by the event's day.
type dispositionEvent struct {
	Kind           assess.Disposition `json:"kind"`
	Place          string             `json:"place"`
	Lat            *float64           `json:"lat"`
	Lon            *float64           `json:"lon"`
	Receiver       string             `json:"receiver"`
	Reason         string             `json:"reason"`
	NoReportReason string             `json:"no_report_reason"`
	PerformedBy    string             `json:"performed_by"`
}

// dispositionSeeders stores the dispositions of the demo.
func dispositionSeeders() map[string]eventSeeder {
	return map[string]eventSeeder{"disposition": seedDisposition}
}

func seedDisposition(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	dec := json.NewDecoder(bytes.NewReader(ev.Data))
	dec.DisallowUnknownFields()
	var d dispositionEvent
	if err := dec.Decode(&d); err != nil {
		return fmt.Errorf("disposition data: %w", err)
	}
	date := sd.At(p.AdmittedAt, ev).UTC().Format(records.DateLayout)
	_, err := sd.Store.Dispose(ctx, sd.UserID(ev.By), p.ID, records.DispositionInput{Kind: d.Kind, Date: date,
		Place: d.Place, Lat: d.Lat, Lon: d.Lon, Receiver: d.Receiver, Reason: d.Reason,
		NoReportReason: d.NoReportReason, PerformedBy: d.PerformedBy})
	return err
}
