package plots

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// linearTicks labels a linear axis at about target round values (steps
// of 1, 2 or 5 times a power of ten, whichever is nearest in ratio to
// the span over target, or with degrees set and a span
// of at least a half turn, multiples of 90 degrees), with one unlabelled
// tick between labels.
type linearTicks struct {
	target  int
	degrees bool
}

// Ticks implements plot.Ticker.
func (t linearTicks) Ticks(min, max float64) []plot.Tick {
	if !isFinite(min) || !isFinite(max) || !(max > min) {
		return []plot.Tick{{Value: min, Label: strconv.FormatFloat(min, 'g', 4, 64)}}
	}
	target := t.target
	if target < 2 {
		target = 2
	}
	raw := (max - min) / float64(target)
	var step float64
	decimals := 0
	if t.degrees && max-min >= 180 {
		step = 90
		for step < raw {
			step *= 2
		}
	} else {
		e := math.Floor(math.Log10(raw))
		best := math.Inf(1)
		for _, m := range []float64{1, 2, 5, 10} {
			c := m * math.Pow(10, e)
			if d := math.Abs(math.Log(c / raw)); d < best {
				best, step = d, c
				decimals = int(math.Max(0, -math.Floor(math.Log10(c)+1e-9)))
			}
		}
	}
	first := math.Ceil(min/step - 1e-9)
	var ticks []plot.Tick
	for i := first; i*step <= max+step*1e-9; i++ {
		v := i * step
		if v == 0 {
			v = 0 // no "-0"
		}
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', decimals, 64)})
		if h := v + step/2; h <= max {
			ticks = append(ticks, plot.Tick{Value: h})
		}
	}
	if h := first*step - step/2; h >= min {
		ticks = append(ticks, plot.Tick{Value: h})
	}
	return ticks
}
