package design

import (
	"bytes"
	"encoding/json"
)

// Families, responses and Bessel normalisations accepted in a Stage.
const (
	Butterworth = "butterworth"
	Chebyshev1  = "chebyshev1"
	Chebyshev2  = "chebyshev2"
	Elliptic    = "elliptic"
	Bessel      = "bessel"
	Notch       = "notch"

	Lowpass  = "lowpass"
	Highpass = "highpass"
	Bandpass = "bandpass"
	Bandstop = "bandstop"

	NormPhase     = "phase"
	NormDelay     = "delay"
	NormMagnitude = "magnitude"
)

// MaxOrder is the largest prototype order accepted, given or computed.
// A band response doubles it in poles.
const MaxOrder = 32

// Edges holds one frequency in Hz, or two for band responses. In JSON it
// is written as a number or as an array of one or two numbers.
type Edges []float64

// UnmarshalJSON accepts a bare number as well as an array.
func (e *Edges) UnmarshalJSON(b []byte) error {
	b = bytes.TrimSpace(b)
	if len(b) > 0 && b[0] == '[' {
		var v []float64
		if err := json.Unmarshal(b, &v); err != nil {
			return err
		}
		*e = v
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*e = Edges{f}
	return nil
}

// Stage is the rate-free specification of one filter stage, in Hz and dB.
// Its JSON form is the spec-file stage of the project's design notes.
//
// A classical family (everything but Notch) is given either in order form
// (Order and CutoffHz) or in tolerance form (PassbandHz, StopbandHz,
// RippleDB, AttenuationDB, no Order), in which case the minimum order is
// computed.
type Stage struct {
	Family        string  `json:"family"`
	Response      string  `json:"response,omitempty"`
	Order         int     `json:"order,omitempty"`
	CutoffHz      Edges   `json:"cutoff_hz,omitempty"`
	PassbandHz    Edges   `json:"passband_hz,omitempty"`
	StopbandHz    Edges   `json:"stopband_hz,omitempty"`
	RippleDB      float64 `json:"ripple_db,omitempty"`
	AttenuationDB float64 `json:"attenuation_db,omitempty"`
	BesselNorm    string  `json:"bessel_norm,omitempty"`

	// Notch stages: a second-order notch at FundamentalHz and at its
	// harmonics up to number Harmonics (0: those below DefaultNotchLimitHz),
	// each BandwidthHz wide at -3 dB, or of constant quality factor Q
	// (bandwidth = centre / Q) when Q is set instead.
	FundamentalHz float64 `json:"fundamental_hz,omitempty"`
	Harmonics     int     `json:"harmonics,omitempty"`
	BandwidthHz   float64 `json:"bandwidth_hz,omitempty"`
	Q             float64 `json:"q,omitempty"`
	OddOnly       bool    `json:"odd_harmonics_only,omitempty"`
	// Tracking (notch stages) makes the notches follow the hum measured
	// in each file as its frequency drifts: FundamentalHz is then the
	// nominal value around which it is looked for, and the stage is
	// designed at it only for reports.
	Tracking bool `json:"tracking,omitempty"`

	// Fractional-octave band stages (family "band"): the band of the
	// 1/Fraction-octave series of IEC 61260-1 whose nominal or exact
	// mid-band frequency is MidbandHz.
	Fraction  int     `json:"fraction,omitempty"`
	MidbandHz float64 `json:"midband_hz,omitempty"`

	// Weighting stages: the curve of a standard (IEC 61672-1 A, C, Z;
	// ISO 8041-1 Wb ... Wm).
	Curve string `json:"curve,omitempty"`
}

// Spec is a chain of stages run in order. With ZeroPhase set the chain
// is meant to be run forward and backward, and it is the squared
// magnitude of that result that must meet each stage's tolerances.
type Spec struct {
	Stages    []Stage `json:"stages"`
	ZeroPhase bool    `json:"zero_phase,omitempty"`
}

// ParseSpec reads a spec file: either one stage object, or an object
// with a "stages" array. Unknown keys are errors, so that a misspelt key
// is not silently ignored. A syntax error, an unknown key or a value of
// the wrong type is a *SpecError with its line and column. A leading
// UTF-8 byte-order mark is ignored. A spec of more than MaxSpecBytes, or
// of more than MaxStages stages, is refused.
func ParseSpec(data []byte) (Spec, error) {
	if len(data) > MaxSpecBytes {
		return Spec{}, errorf(ErrInvalid, "invalid spec: %d bytes, more than the limit of %d", len(data), MaxSpecBytes)
	}
	data = bytes.TrimPrefix(data, utf8BOM)
	if err := locateSpecError(data); err != nil {
		return Spec{}, err
	}
	var probe map[string]json.RawMessage
	if err := json.Unmarshal(data, &probe); err != nil {
		return Spec{}, errorf(ErrInvalid, "spec is not a JSON object: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if _, ok := probe["stages"]; ok {
		var s Spec
		if err := dec.Decode(&s); err != nil {
			return Spec{}, errorf(ErrInvalid, "invalid spec: %w", err)
		}
		if len(s.Stages) == 0 {
			return Spec{}, errorf(ErrInvalid, "invalid spec: \"stages\" is empty")
		}
		if len(s.Stages) > MaxStages {
			return Spec{}, errorf(ErrInvalid, "invalid spec: %d stages, more than the limit of %d; combine or remove stages", len(s.Stages), MaxStages)
		}
		return s, nil
	}
	var one struct {
		Stage
		ZeroPhase bool `json:"zero_phase,omitempty"`
	}
	if err := dec.Decode(&one); err != nil {
		return Spec{}, errorf(ErrInvalid, "invalid spec: %w", err)
	}
	return Spec{Stages: []Stage{one.Stage}, ZeroPhase: one.ZeroPhase}, nil
}

// ZPK is a filter as zeros, poles and gain: H = Gain * prod(x - z) / prod(x - p),
// with x = s (analog) or x = z (digital). Complex roots come in conjugate pairs.
type ZPK struct {
	Zeros []complex128
	Poles []complex128
	Gain  float64
}

// Section is one second-order section [b0, b1, b2, a0, a1, a2] of
// H(z) = (b0 + b1 z^-1 + b2 z^-2) / (a0 + a1 z^-1 + a2 z^-2), with a0 = 1.
type Section [6]float64
