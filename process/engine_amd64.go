//go:build amd64 && !purego

package process

// useWave4 selects the SSE2 wavefront kernel. SSE2 is part of the amd64
// baseline, so no CPU feature check is needed. Tests switch it off to
// compare against the portable path.
var useWave4 = true

// wave4 runs sections k = 0..3 of a group over a channel pair: at each
// of steps steps, section k filters the frame 3-k frames behind x (x
// points at the frame of section 0 and advances by stride samples; a
// negative stride goes through the frames in reverse memory order).
// w holds 40 broadcast coefficients (b0 b0 b1 b1 b2 b2 a1 a1 a2 a2 per
// section), z the 16 state values in unit layout. Implemented in
// engine_amd64.s with the arithmetic of pairSection.
//
//go:noescape
func wave4(x *float64, steps int, stride int, w *float64, z *float64)
