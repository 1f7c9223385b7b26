package web

import (
	"math"
	"strconv"
	"strings"

	"aloft/assess"
)

// parseFloatField reads a decimal number typed by a person ("1,5" is read as
// 1.5). Empty is 0 when optional, an error otherwise.
func parseFloatField(field, raw string, optional bool) (float64, *assess.ValidationError) {
	v := strings.TrimSpace(strings.ReplaceAll(raw, ",", "."))
	if v == "" {
		if optional {
			return 0, nil
		}
		return 0, &assess.ValidationError{Field: field, Value: raw, Message: "this is required: enter a number"}
	}
	f, err := strconv.ParseFloat(v, 64)
	if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, &assess.ValidationError{Field: field, Value: raw, Message: "enter a number, such as 12 or 12.5"}
	}
	return f, nil
}

// parseOptFloat reads an optional number: nil when empty.
func parseOptFloat(field, raw string) (*float64, *assess.ValidationError) {
	if strings.TrimSpace(raw) == "" {
		return nil, nil
	}
	f, err := parseFloatField(field, raw, false)
	if err != nil {
		return nil, err
	}
	return &f, nil
}

// parseIntField reads a whole number; empty is an error unless optional (0).
func parseIntField(field, raw string, optional bool) (int, *assess.ValidationError) {
	v := strings.TrimSpace(raw)
	if v == "" {
		if optional {
			return 0, nil
		}
		return 0, &assess.ValidationError{Field: field, Value: raw, Message: "this is required: enter a whole number"}
	}
	n, err := strconv.Atoi(v)
	if err != nil {
		return 0, &assess.ValidationError{Field: field, Value: raw, Message: "enter a whole number, such as 3"}
	}
	return n, nil
}

// parseOptInt reads an optional whole number: nil when empty.
func parseOptInt(field, raw string) (*int, *assess.ValidationError) {
	if strings.TrimSpace(raw) == "" {
		return nil, nil
	}
	n, err := parseIntField(field, raw, false)
	if err != nil {
		return nil, err
	}
	return &n, nil
}
