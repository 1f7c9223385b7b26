// Package records is Aloft's store: a SQLite database (modernc.org/sqlite,
// pure Go) holding the centre, users and their login sessions, patients and
// every record about them, with an append-only audit trail.
//
// Every public method that writes opens one immediate transaction, writes the
// change and its audit row in it, and commits. Nothing is ever hard-deleted:
// removals are soft deletes with a reason, corrections are new versions.
package records
