package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// specFlags are the flags that describe a filter on the command line, for
// every command that takes a spec. A spec file (--spec) and these flags
// are alternatives; --zero-phase applies to either.
type specFlags struct {
	file        string
	family      string
	response    string
	order       int
	cutoff      string
	passband    string
	stopband    string
	ripple      float64
	attenuation float64
	besselNorm  string
	fundamental float64
	harmonics   int
	bandwidth   float64
	q           float64
	oddOnly     bool
	zeroPhase   bool
	weighting   string
	track       bool
}

func (s *specFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&s.file, "spec", "", "read the filter spec from a JSON `file`")
	fs.StringVar(&s.family, "family", "", "filter `family`: "+strings.Join(design.Families(), ", "))
	fs.StringVar(&s.response, "response", "", "`type`: lowpass, highpass, bandpass or bandstop")
	fs.IntVar(&s.order, "order", 0, "prototype `order` (a band response has twice as many poles); omit for the minimum order from --passband/--stopband")
	fs.StringVar(&s.cutoff, "cutoff", "", "critical frequency in Hz, or two as `lo,hi` for a band (with --order)")
	fs.StringVar(&s.passband, "passband", "", "passband edge(s) in Hz, `f` or lo,hi, for the minimum-order form")
	fs.StringVar(&s.stopband, "stopband", "", "stopband edge(s) in Hz, `f` or lo,hi, for the minimum-order form")
	fs.Float64Var(&s.ripple, "ripple", 0, "largest passband ripple in `dB`")
	fs.Float64Var(&s.attenuation, "attenuation", 0, "smallest stopband attenuation in `dB`")
	fs.StringVar(&s.besselNorm, "bessel-norm", "", "Bessel normalisation: phase (default), delay or magnitude")
	fs.Float64Var(&s.fundamental, "hum", 0, "notch: mains fundamental in `Hz` (for example 50 or 60)")
	fs.IntVar(&s.harmonics, "harmonics", 0, "notch: highest harmonic `number` to notch (default: every harmonic below 1000 Hz)")
	fs.Float64Var(&s.bandwidth, "notch-width", 0, "notch: -3 dB width of each notch in `Hz`")
	fs.Float64Var(&s.q, "notch-q", 0, "notch: constant quality factor `Q` (width = centre / Q) instead of --notch-width")
	fs.BoolVar(&s.oddOnly, "odd-only", false, "notch: odd harmonics only")
	fs.StringVar(&s.weighting, "weighting", "", "add a standard weighting `curve` after the other stages: "+strings.Join(design.WeightingCurves(), ", ")+" (IEC 61672-1, ISO 8041-1); weighted levels from a file are no sound level meter or vibration meter reading")
	fs.BoolVar(&s.zeroPhase, "zero-phase", false, "run forward and backward: the squared response meets the spec")
	fs.BoolVar(&s.track, "track", false, "notch: the notches follow the hum measured in each file as it drifts (tracking: true)")
}

// spec builds the spec from the file or from the flags, then adds the
// --weighting stage at the end of the chain.
func (s *specFlags) spec(fs *pflag.FlagSet) (design.Spec, error) {
	sp, err := s.baseSpec(fs)
	if err != nil || s.weighting == "" {
		return sp, err
	}
	sp.Stages = append(sp.Stages, design.Stage{Family: design.Weighting, Curve: s.weighting})
	return sp, nil
}

// baseSpec builds the spec from the file or from the flags, without
// --weighting; with --weighting alone it is an empty chain.
func (s *specFlags) baseSpec(fs *pflag.FlagSet) (design.Spec, error) {
	inline := []string{"family", "response", "order", "cutoff", "passband", "stopband", "ripple", "attenuation", "bessel-norm", "hum", "harmonics", "notch-width", "notch-q", "odd-only"}
	var set []string
	for _, n := range inline {
		if fs.Changed(n) {
			set = append(set, "--"+n)
		}
	}
	if s.file != "" {
		if len(set) > 0 {
			return design.Spec{}, usagef("give the filter either with --spec or with flags, not both (also set: %s)", strings.Join(set, ", "))
		}
		b, err := readSpecFile(s.file)
		if err != nil {
			return design.Spec{}, wavio.PathError(s.file, err)
		}
		sp, err := design.ParseSpec(b)
		var se *design.SpecError
		if errors.As(err, &se) {
			return design.Spec{}, fmt.Errorf("%s:%d:%d: %s", s.file, se.Line, se.Column, se.Msg)
		}
		if err != nil {
			return design.Spec{}, fmt.Errorf("%s: %w", s.file, err)
		}
		if s.zeroPhase {
			sp.ZeroPhase = true
		}
		if s.track {
			n := 0
			for i := range sp.Stages {
				if sp.Stages[i].Family == design.Notch {
					sp.Stages[i].Tracking = true
					n++
				}
			}
			if n == 0 {
				return design.Spec{}, usagef("--track: %s has no notch stage to track the hum with", s.file)
			}
		}
		return sp, nil
	}
	if s.family == "" {
		if s.weighting != "" {
			var other []string
			for _, n := range inline {
				if fs.Changed(n) {
					other = append(other, "--"+n)
				}
			}
			if len(other) > 0 {
				return design.Spec{}, usagef("%s need --family (or use --spec FILE)", strings.Join(other, ", "))
			}
			return design.Spec{ZeroPhase: s.zeroPhase}, nil
		}
		return design.Spec{}, usagef("no filter given: use --spec FILE, --family with its flags, or --weighting CURVE")
	}
	if s.cutoff != "" && s.order == 0 && s.family != design.Notch {
		return design.Spec{}, usagef("--cutoff needs --order N, the prototype order (for example --order 4); or, for the minimum order, give --passband, --stopband, --ripple and --attenuation instead of --cutoff")
	}
	st := design.Stage{
		Family: s.family, Response: s.response, Order: s.order,
		RippleDB: s.ripple, AttenuationDB: s.attenuation, BesselNorm: s.besselNorm,
		FundamentalHz: s.fundamental, Harmonics: s.harmonics, BandwidthHz: s.bandwidth, Q: s.q, OddOnly: s.oddOnly,
		Tracking: s.track,
	}
	var err error
	if st.CutoffHz, err = parseEdges("--cutoff", s.cutoff); err != nil {
		return design.Spec{}, err
	}
	if st.PassbandHz, err = parseEdges("--passband", s.passband); err != nil {
		return design.Spec{}, err
	}
	if st.StopbandHz, err = parseEdges("--stopband", s.stopband); err != nil {
		return design.Spec{}, err
	}
	return design.Spec{Stages: []design.Stage{st}, ZeroPhase: s.zeroPhase}, nil
}

func parseEdges(flag, v string) (design.Edges, error) {
	if v == "" {
		return nil, nil
	}
	parts := strings.Split(v, ",")
	if len(parts) > 2 {
		return nil, usagef("%s takes one frequency or two as lo,hi, got %q", flag, v)
	}
	e := make(design.Edges, len(parts))
	for i, p := range parts {
		f, err := strconv.ParseFloat(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(p), "Hz")), 64)
		if err != nil {
			return nil, usagef("%s: %q is not a frequency in Hz", flag, p)
		}
		e[i] = f
	}
	return e, nil
}

// readSpecFile reads a spec file of at most design.MaxSpecBytes: a
// larger one (or an endless one such as /dev/zero) is refused after
// that many bytes.
func readSpecFile(name string) ([]byte, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	b, err := io.ReadAll(io.LimitReader(f, design.MaxSpecBytes+1))
	if err != nil {
		return nil, err
	}
	if len(b) > design.MaxSpecBytes {
		return nil, fmt.Errorf("larger than %d bytes, the limit for a spec file; is it the right file?", design.MaxSpecBytes)
	}
	return b, nil
}

// check checks what can be checked of spec without a sample rate; a
// failure is a usage error naming the spec file, if any.
func (s *specFlags) check(spec design.Spec) error {
	if err := design.CheckSpec(spec); err != nil {
		if s.file != "" {
			return usagef("%s: %v", s.file, err)
		}
		return usagef("%v", err)
	}
	return nil
}

// specKeyFlags maps the spec keys that have a flag to it.
var specKeyFlags = map[string]string{
	"order": "--order", "cutoff_hz": "--cutoff", "passband_hz": "--passband", "stopband_hz": "--stopband",
	"ripple_db": "--ripple", "attenuation_db": "--attenuation", "fundamental_hz": "--hum",
	"harmonics": "--harmonics", "bandwidth_hz": "--notch-width", "q": "--notch-q",
}

// valueError restates a design error about one value in the words the
// user gave it in: for a spec given by flags, as a usage error naming
// the flag (exit 2); for a spec file, naming the file and the key. Other
// errors keep their type (errors.Is and errors.As still see it) but are
// shown without the library's "design: " prefix, after the spec file's
// name when there is one.
func (s *specFlags) valueError(err error) error {
	ve, ok := design.ValueOf(err)
	if !ok {
		msg := strings.TrimPrefix(err.Error(), "design: ")
		if s.file != "" {
			msg = s.file + ": " + msg
		}
		return restatedError{msg: msg, err: err}
	}
	if s.file != "" {
		return fmt.Errorf("%s: %s value %s %s", s.file, ve.Key, ve.Quantity(), ve.Detail)
	}
	if f, ok := specKeyFlags[ve.Key]; ok {
		return usagef("%s %s %s", f, ve.Quantity(), ve.Detail)
	}
	return err
}

// restatedError shows msg for err and unwraps to it.
type restatedError struct {
	msg string
	err error
}

func (e restatedError) Error() string { return e.msg }
func (e restatedError) Unwrap() error { return e.err }
