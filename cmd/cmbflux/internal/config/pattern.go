package config

import (
	"fmt"
	"strconv"
	"strings"

	"cmbflux/flux"
)

// MaxPatternTerms bounds the number of terms of --pattern.
const MaxPatternTerms = 1000

// ParsePattern reads the terms of --pattern: flux.ParseTerm terms
// L:M[:cos|sin][:WEIGHT] separated by commas, e.g. "2:2:cos,1:0:cos:0.3".
// Errors do not name the parameter; Resolve adds where it was set.
func ParsePattern(raw string) ([]flux.Term, error) {
	parts := strings.Split(raw, ",")
	if len(parts) > MaxPatternTerms {
		return nil, fmt.Errorf("%d terms; at most %d are accepted", len(parts), MaxPatternTerms)
	}
	var terms []flux.Term
	for _, p := range parts {
		if strings.TrimSpace(p) == "" {
			continue
		}
		t, err := flux.ParseTerm(p)
		if err != nil {
			return nil, fmt.Errorf("%s", strings.TrimPrefix(err.Error(), flux.ErrSetting.Error()+": "))
		}
		if t.L > 1000 {
			return nil, fmt.Errorf("harmonic %q: degree %d is above 1000, the largest lmax accepted", strings.TrimSpace(p), t.L)
		}
		terms = append(terms, t)
	}
	if len(terms) == 0 {
		return nil, fmt.Errorf("no terms; want L:M[:cos|sin][:WEIGHT] separated by commas, e.g. 2:2:cos or 2:2:cos:1,1:0:cos:0.3")
	}
	nonzero := false
	for _, t := range terms {
		nonzero = nonzero || t.Weight != 0
	}
	if !nonzero {
		return nil, fmt.Errorf("every weight is 0, so the pattern is uniform; give at least one term with a non-zero weight")
	}
	return terms, nil
}

// PatternText writes terms back in the form ParsePattern reads, with the
// kind and weight always given (e.g. "2:2:cos:1,1:0:cos:0.3").
func PatternText(terms []flux.Term) string {
	parts := make([]string, len(terms))
	for i, t := range terms {
		kind := "cos"
		if t.Sin {
			kind = "sin"
		}
		parts[i] = fmt.Sprintf("%d:%d:%s:%s", t.L, t.M, kind, strconv.FormatFloat(t.Weight, 'g', -1, 64))
	}
	return strings.Join(parts, ",")
}

// tomographyOnly lists the parameters that only make sense for a
// tomography input; with --pattern they are refused rather than ignored.
var tomographyOnly = []string{"var", "units", "vref", "force-amplitude", "missing", "lon-name", "lat-name",
	"depth-name", "vertical", "depth", "depth-range", "force-lmax"}

// resolvePattern handles the pattern key of s: it fills sp.Pattern and
// refuses the keys that need a tomography input.
func resolvePattern(s Set, sp *Spec) error {
	v, ok := s["pattern"]
	if !ok {
		return nil
	}
	for _, other := range []string{"input", "demo"} {
		if _, set := s[other]; set && (other != "demo" || sp.Demo) {
			return v.errorf("pattern", "give one input: --pattern, --input or --demo")
		}
	}
	terms, err := ParsePattern(v.Raw)
	if err != nil {
		return v.errorf("pattern", "%v", err)
	}
	for _, k := range tomographyOnly {
		if w, set := s[k]; set {
			return w.errorf(k, "only used with a tomography input (--input or --demo), not with --pattern")
		}
	}
	if q, set := s["quantity"]; set && q.Raw == "dvs" {
		return q.errorf("quantity", "dvs needs a tomography input: an idealised --pattern has no velocity anomaly; choose flux, anomaly, relative, superadiabatic or dtdr")
	}
	sp.Pattern = terms
	if _, set := s["lmax"]; !set {
		sp.LMax = 1
		for _, t := range terms {
			sp.LMax = max(sp.LMax, t.L)
		}
	}
	return nil
}
