package flux

import (
	"fmt"
	"math"

	"cmbflux/flux/sh"
)

// Rotate returns the pattern turned rigidly by angle degrees about the axis
// through (poleLon, poleLat) in degrees, counter-clockwise seen from outside
// the sphere above that point (about the north pole a positive angle moves
// features east). The extrema, areas and outlines move with the pattern, so
// no search is repeated. About the geographic poles the coefficients turn
// exactly, each (cos, sin) pair of order m by m*angle; about other poles by
// sh.Coeffs.Rotate.
func (p *Pattern) Rotate(poleLon, poleLat, angle float64) (*Pattern, error) {
	if !(poleLat >= -90 && poleLat <= 90) || math.IsNaN(poleLon) || math.IsInf(poleLon, 0) || math.IsNaN(angle) || math.IsInf(angle, 0) {
		return nil, fmt.Errorf("%w: rotation pole (%g, %g) or angle %g: give lon, lat in degrees (lat in [-90, 90]) and a finite angle", ErrSetting, poleLon, poleLat, angle)
	}
	a := angle / rad2deg
	R := sh.AxisAngle((90-poleLat)/rad2deg, poleLon/rad2deg, a)
	turn := func(c *sh.Coeffs) (*sh.Coeffs, error) {
		switch {
		case poleLat == 90:
			return c.ShiftLongitude(a), nil
		case poleLat == -90:
			return c.ShiftLongitude(-a), nil
		}
		return c.Rotate(R)
	}
	q := *p
	var err error
	if q.g, err = turn(p.g); err != nil {
		return nil, fmt.Errorf("flux: rotating the pattern: %v", err)
	}
	if q.input, err = turn(p.input); err != nil {
		return nil, fmt.Errorf("flux: rotating the input: %v", err)
	}
	move := func(x point) point {
		c, l := R.ApplyPoint(x.colat, x.lon)
		return point{c, l}
	}
	q.max.at, q.min.at, q.slow = move(p.max.at), move(p.min.at), move(p.slow)
	if p.rot == nil {
		q.rot = &R
	} else {
		r := p.rot.Then(R)
		q.rot = &r
	}
	if p.refGrid != nil {
		return q.MeasuredOn(p.refGrid)
	}
	return &q, nil
}

// Blend returns the pattern (1 - w) a + w b (coefficients of the
// band-limited patterns, and of the inputs for the slowest-region
// diagnostic), with the options of a. Extrema and areas are searched anew.
// A weight outside [0, 1] extrapolates and draws a warning.
func Blend(a, b *Pattern, w float64) (*Pattern, error) {
	if math.IsNaN(w) || math.IsInf(w, 0) {
		return nil, fmt.Errorf("%w: blend weight %g must be finite", ErrSetting, w)
	}
	mix := func(x, y *sh.Coeffs) *sh.Coeffs {
		l := max(x.LMax, y.LMax)
		x, y = x.Truncate(l), y.Truncate(l)
		for k := range x.C {
			x.C[k] = (1-w)*x.C[k] + w*y.C[k]
			x.S[k] = (1-w)*x.S[k] + w*y.S[k]
		}
		return x
	}
	o := a.opts
	o.LMax = max(a.g.LMax, b.g.LMax)
	var warn []string
	if w < 0 || w > 1 {
		warn = append(warn, fmt.Sprintf("blend extrapolates: weight %g lies outside [0, 1], so the pattern is not between the two it blends (its amplitude per unit of either may grow without bound)", w))
	}
	warn = append(warn, a.warn...)
	for _, s := range b.warn {
		dup := false
		for _, t := range warn {
			dup = dup || s == t
		}
		if !dup {
			warn = append(warn, s)
		}
	}
	p, err := newPattern(mix(a.g, b.g), mix(a.input, b.input), o, warn)
	if err != nil {
		return nil, fmt.Errorf("blend at weight %g: %w", w, err)
	}
	if a.refGrid != nil {
		return p.MeasuredOn(a.refGrid)
	}
	return p, nil
}

// Spin is a rigid rotation of a pattern at a constant rate.
type Spin struct {
	// PoleLon and PoleLat locate the rotation axis in degrees.
	PoleLon, PoleLat float64
	// Rate is the rotation rate in degrees per unit of time,
	// counter-clockwise seen from outside above the pole.
	Rate float64
}

// Frame is one boundary condition of a time sequence.
type Frame struct {
	// Time is the sample time, in the caller's unit.
	Time float64
	// Result is the boundary condition at Time.
	Result *Result
}

// Build makes a Result from a Pattern, for example
//
//	func(p *flux.Pattern) (*flux.Result, error) { return p.WithQStar(2, ref) }
type Build func(*Pattern) (*Result, error)

// SpinSequence returns the boundary conditions of p turned by Rate * t
// degrees about the spin pole at each of the times (p itself is the state
// at time 0), each built by build (so the amplitude rule, and q*, is the
// same in every frame).
func SpinSequence(p *Pattern, s Spin, times []float64, build Build) ([]Frame, error) {
	if len(times) == 0 {
		return nil, fmt.Errorf("%w: no sample times", ErrSetting)
	}
	frames := make([]Frame, 0, len(times))
	for _, t := range times {
		q, err := p.Rotate(s.PoleLon, s.PoleLat, s.Rate*t)
		if err != nil {
			return nil, err
		}
		r, err := build(q)
		if err != nil {
			return nil, fmt.Errorf("time %g: %w", t, err)
		}
		frames = append(frames, Frame{t, r})
	}
	return frames, nil
}

// BlendSequence returns the boundary conditions blended linearly from a at
// time t0 to b at time t1, Blend(a, b, (t - t0)/(t1 - t0)), at each of the
// times, each built by build. Times outside [t0, t1] extrapolate; that draws
// an error, since the blend weight leaves [0, 1].
func BlendSequence(a, b *Pattern, t0, t1 float64, times []float64, build Build) ([]Frame, error) {
	if !(t1 != t0) || len(times) == 0 {
		return nil, fmt.Errorf("%w: a blend needs t0 != t1 and at least one sample time", ErrSetting)
	}
	frames := make([]Frame, 0, len(times))
	for _, t := range times {
		w := (t - t0) / (t1 - t0)
		if w < -1e-12 || w > 1+1e-12 {
			return nil, fmt.Errorf("%w: time %g lies outside the blend interval [%g, %g]", ErrSetting, t, t0, t1)
		}
		q, err := Blend(a, b, w)
		if err != nil {
			return nil, err
		}
		r, err := build(q)
		if err != nil {
			return nil, fmt.Errorf("time %g: %w", t, err)
		}
		frames = append(frames, Frame{t, r})
	}
	return frames, nil
}
