package analyze

// spillLow: on Linux the tracker's reduced-rate signal goes to an
// unlinked temporary file (removed at once, so nothing is left behind
// whatever happens to the process).
const spillLow = true
