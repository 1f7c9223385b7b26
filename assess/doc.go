// Package assess is Aloft's pure engine: the shared vocabularies, the
// published power-curve model of bird flight (air density, shape, power,
// characteristic speeds, power margin, takeoff), the species reference, and
// the readiness assessment built from a patient's records.
//
// It performs no I/O, reads no clock and imports nothing of Aloft's: the
// thresholds, the site and the time are arguments. SI units inside (kg, m,
// m², s, W, kg/m³, N); the edges (web forms, records rows) convert.
package assess
