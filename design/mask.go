package design

import "math"

// MaskPoint is one row of a standard's tolerance mask for a stage: at
// FrequencyHz the stage's response must lie within [LowerDB, UpperDB]
// (absolute dB of the stage's effective response). A missing limit is
// -Inf (no lower limit) or +Inf (no upper limit).
//
// Stages defined by a standard (weightings, fractional-octave bands)
// carry their mask in Designed.Mask, so that verification can build its
// check list from the standard's table instead of from a spec's edges.
type MaskPoint struct {
	FrequencyHz float64 // exact frequency of the check, Hz
	Label       string  // the standard's name for the point, e.g. a nominal frequency "12.5k"
	TargetDB    float64 // the standard's design goal at FrequencyHz, dB (NaN when it gives none)
	LowerDB     float64 // lowest allowed response, dB, or -Inf
	UpperDB     float64 // highest allowed response, dB, or +Inf
	Source      string  // the standard, table or clause the row comes from
}

// Within reports whether a response of db decibels lies inside the mask
// point's limits.
func (m MaskPoint) Within(db float64) bool {
	return !math.IsNaN(db) && db >= m.LowerDB && db <= m.UpperDB
}
