package analyze

import (
	"math"
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

func TestCalibration(t *testing.T) {
	const tolDB = 1e-9 // float64 rounding only: each want is the closed form the comment beside it gives
	// A full-scale sine has the mean square 1/2.
	const sineMS = 0.5
	for _, tc := range []struct {
		name   string
		cal    func() (Calibration, error)
		ms     float64
		wantDB float64
		unit   string
	}{
		// Full scale: a full-scale sine reads 10 log10(1/2) = -3.0103 dB.
		{"dBFS sine", func() (Calibration, error) { return FullScale, nil }, sineMS, 10 * math.Log10(0.5), ""},
		// A 94 dB calibrator peaking at full scale reads 94 dB SPL.
		{"94dB", func() (Calibration, error) { return ParseFullScale("94dB") }, sineMS, 94, "Pa"},
		{"114 dB", func() (Calibration, error) { return ParseFullScale(" 114 dB ") }, sineMS, 114, "Pa"},
		// A sample of 1.0 is 1 Pa: a sine of 1 Pa peak is 20 log10(0.7071/20e-6) = 90.97 dB.
		{"1Pa", func() (Calibration, error) { return ParseFullScale("1Pa") }, sineMS, 20 * math.Log10(math.Sqrt(0.5)/20e-6), "Pa"},
		// 10 m/s^2 at full scale: a full-scale DC reads 20 log10(10/1e-6) = 140 dB re 1 um/s^2 (ISO 1683).
		{"10m/s^2", func() (Calibration, error) { return ParseFullScale("10m/s^2") }, 1, 140, "m/s^2"},
		// 50 mV/Pa into 2 V full scale: 1.0 = 40 Pa; DC 40 Pa = 20 log10(40/20e-6) = 126.02 dB.
		{"50mV/Pa", func() (Calibration, error) { return ParseSensitivity("50mV/Pa", 2) }, 1, 20 * math.Log10(40/20e-6), "Pa"},
		// 100 mV/g into 10 V: 1.0 = 100 g = 980.665 m/s^2.
		{"100mV/g", func() (Calibration, error) { return ParseSensitivity("100mV/g", 10) }, 1, 20 * math.Log10(980.665/1e-6), "m/s^2"},
		{"1.02mV/(m/s^2)", func() (Calibration, error) { return ParseSensitivity("1.02mV/(m/s^2)", 1) }, 1, 20 * math.Log10(1/1.02e-3/1e-6), "m/s^2"},
		// Velocity re 1 nm/s, displacement re 1 pm (ISO 1683).
		{"units m/s", func() (Calibration, error) { return ParseUnits("m/s") }, 1e-6, 20 * math.Log10(1e-3/1e-9), "m/s"},
		{"units m", func() (Calibration, error) { return ParseUnits("m") }, 1e-12, 20 * math.Log10(1e-6/1e-12), "m"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c, err := tc.cal()
			if err != nil {
				t.Fatal(err)
			}
			if got := c.Level(tc.ms); math.Abs(got-tc.wantDB) > tolDB {
				t.Errorf("level %.6f dB, want %.6f", got, tc.wantDB)
			}
			if c.Unit != tc.unit {
				t.Errorf("unit %q, want %q", c.Unit, tc.unit)
			}
		})
	}
	if c, _ := ParseUnits("Pa"); !c.Engineering {
		t.Error("--units does not mark engineering units")
	}
	for _, bad := range []func() error{
		func() error { _, err := ParseFullScale("loud"); return err },
		func() error { _, err := ParseFullScale("-3Pa"); return err },
		func() error { _, err := ParseFullScale("3furlongs"); return err },
		func() error { _, err := ParseSensitivity("10mV/Pa", 0); return err },
		func() error { _, err := ParseSensitivity("10mA/Pa", 1); return err },
		func() error { _, err := ParseSensitivity("10mV", 1); return err },
		func() error { _, err := ParseUnits("psi"); return err },
	} {
		if bad() == nil {
			t.Error("a bad calibration was accepted")
		}
	}
}

// sosState is the plain serial cascade of second-order sections, the
// reference of the wavefront kernels, run in
// transposed direct form II.
type sosState struct {
	s []design.Section
	z []float64
}

func newSOS(s []design.Section) *sosState {
	return &sosState{s: s, z: make([]float64, 2*len(s))}
}

// run filters x in place.
func (f *sosState) run(x []float64) {
	for k := range f.s {
		sec := &f.s[k]
		b0, b1, b2, a1, a2 := sec[0], sec[1], sec[2], sec[4], sec[5]
		z1, z2 := f.z[2*k], f.z[2*k+1]
		for i, v := range x {
			y := b0*v + z1
			z1 = b1*v - a1*y + z2
			z2 = b2*v - a2*y
			x[i] = y
		}
		f.z[2*k], f.z[2*k+1] = z1, z2
	}
}

// TestWaveKernelsMatchSerial: the wavefront kernels give the serial
// cascade's output bit for bit, for any block length.
func TestWaveKernelsMatchSerial(t *testing.T) {
	bank, err := NewBandBank(BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 10000, ToHz: 16000}) // 3 sections (10 kHz), 4 (12.5, 16 kHz)
	if err != nil {
		t.Fatal(err)
	}
	x := bankNoise(5000, 9)
	for _, d := range bank.Filters() {
		secs := normalised(d.Sections)
		for _, block := range []int{1, 2, 3, 4, 5, 64, 1000} {
			want := append([]float64(nil), x...)
			newSOS(secs).run(want)
			got := append([]float64(nil), x...)
			bb := bankBand{secs: secs, z: [][][2]float64{make([][2]float64, len(secs))}}
			for i := 0; i < len(got); i += block {
				bb.run(got[i:min(len(got), i+block)], 0)
			}
			for i := range got {
				if got[i] != want[i] {
					t.Fatalf("%d sections, blocks of %d: sample %d differs: %g, %g", len(secs), block, i, got[i], want[i])
				}
			}
		}
	}
}
