package plots

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestSimplifyPaths: a straight run of points becomes its two ends, and a
// curve keeps every point it needs to stay within pathTolerance of the
// original (checked at every original point), with its ends unchanged.
func TestSimplifyPaths(t *testing.T) {
	var line, wave []string
	var orig [][2]float64
	for i := 0; i <= 500; i++ {
		x := float64(i) * 0.7
		line = append(line, fmt.Sprintf("%.3f,%.3f", x, 10+0.5*x))
		y := 100 + 40*math.Sin(x/20)
		wave = append(wave, fmt.Sprintf("%.3f,%.3f", x, y))
		orig = append(orig, [2]float64{x, y})
	}
	svg := `<path d="M` + strings.Join(line, "L") + `" /><path d="M` + strings.Join(wave, "L") + `Z" />`
	out := string(simplifyPaths([]byte(svg)))
	paths := svgPath.FindAllStringSubmatch(out, -1)
	if len(paths) != 2 {
		t.Fatalf("%d paths in %q", len(paths), out)
	}
	if got := strings.Split(paths[0][1], "L"); len(got) != 2 || got[0] != line[0] || got[1] != line[len(line)-1] {
		t.Errorf("straight line kept as %v", got)
	}
	if paths[1][2] != "Z" {
		t.Error("the closing Z was lost")
	}
	var kept [][2]float64
	for _, p := range strings.Split(paths[1][1], "L") {
		x, y, _ := strings.Cut(p, ",")
		fx, _ := strconv.ParseFloat(x, 64)
		fy, _ := strconv.ParseFloat(y, 64)
		kept = append(kept, [2]float64{fx, fy})
	}
	if len(kept) >= len(orig)/2 || len(kept) < 10 {
		t.Errorf("curve kept %d of %d points", len(kept), len(orig))
	}
	// Every original point lies within the tolerance of the kept polyline
	// (a segment's distance, with a rounding allowance for the 3 decimals).
	const roundTol = 1e-3
	for _, p := range orig {
		best := math.Inf(1)
		for k := 1; k < len(kept); k++ {
			best = math.Min(best, segDist(p, kept[k-1], kept[k]))
		}
		if best > pathTolerance+roundTol {
			t.Fatalf("point %v is %.4f from the simplified curve", p, best)
		}
	}
}

func segDist(p, a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	l2 := dx*dx + dy*dy
	u := 0.0
	if l2 > 0 {
		u = math.Max(0, math.Min(1, ((p[0]-a[0])*dx+(p[1]-a[1])*dy)/l2))
	}
	return math.Hypot(p[0]-a[0]-u*dx, p[1]-a[1]-u*dy)
}
