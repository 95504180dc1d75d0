package design

import (
	"context"
	"fmt"
)

// Limits on a spec, so that no spec, however written, takes unbounded
// memory or time to read and design. A stage of MaxNotches notches takes
// about a second to design; MaxSections bounds the whole chain to a few
// seconds, and DesignContext can stop it sooner.
const (
	// MaxSpecBytes is the largest spec file accepted; real ones take a
	// few kilobytes.
	MaxSpecBytes = 1 << 20
	// MaxStages is the most stages a spec may chain.
	MaxStages = 32
	// MaxSections is the most second-order sections a designed chain may
	// hold, all stages together.
	MaxSections = 2048
)

// CheckSpec checks what can be checked of a spec without a sample rate:
// the number of stages, and every stage's keys, family, response, order,
// levels and the order of its edges. A spec that fails it fails at every
// rate; one that passes may still fail at a given rate (an edge at or
// above its Nyquist frequency, or a minimum order above MaxOrder).
func CheckSpec(spec Spec) error {
	if len(spec.Stages) == 0 {
		return errorf(ErrInvalid, "invalid spec: no stages")
	}
	if len(spec.Stages) > MaxStages {
		return errorf(ErrInvalid, "invalid spec: %d stages, more than the limit of %d; combine or remove stages", len(spec.Stages), MaxStages)
	}
	for i, st := range spec.Stages {
		// At a rate this high every edge lies below Nyquist, so only
		// the rate-free checks can fail.
		if err := validate(st, 1e300); err != nil {
			if len(spec.Stages) > 1 {
				return fmt.Errorf("stage %d: %w", i+1, err)
			}
			return err
		}
	}
	return nil
}

// DesignContext is Design, checking ctx between stages and before each
// costly step, so that a long design (thousands of notches) stops soon
// after ctx is cancelled, with ctx's error.
func DesignContext(ctx context.Context, spec Spec, rate float64) (*Filter, error) {
	return design(ctx, spec, rate)
}

// countSections checks that the stages designed so far stay within
// MaxSections.
func countSections(stages []Designed, next int) error {
	n := next
	for _, d := range stages {
		n += len(d.Sections)
	}
	if n > MaxSections {
		return errorf(ErrOrderLimit, "the chain needs more than %d second-order sections (%d so far); use fewer stages or notches (set harmonics)", MaxSections, n)
	}
	return nil
}
