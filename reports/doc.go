// Package reports renders assessments and case histories as PDF and CSV.
//
// The permit-reporting exports live here too: a year's case listing (one row
// per patient) and its per-species summary, which reconcile with each other
// (Reconcile), and a patient's whole record as CSV. Every CSV is UTF-8, with
// an optional byte-order mark for spreadsheets, and neutralises text cells a
// spreadsheet would read as a formula (see WriteCSV).
package reports
