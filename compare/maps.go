package compare

import (
	"fmt"
	"math"
	"sort"
)

// Grid is a regular longitude-latitude grid of sample points shared by all
// models in a comparison: Lon and Lat in degrees, fields stored row by row,
// value[j*len(Lon)+i] at (Lon[i], Lat[j]).
type Grid struct {
	Lon, Lat []float64
}

// Len returns the number of points.
func (g Grid) Len() int { return len(g.Lon) * len(g.Lat) }

// AreaWeights returns the weight of each point, proportional to the cosine of
// its latitude (the area element of a regular lon-lat grid) and normalised to
// sum to 1.
func (g Grid) AreaWeights() []float64 {
	w := make([]float64, g.Len())
	var s float64
	for j, lat := range g.Lat {
		c := math.Max(0, math.Cos(lat*math.Pi/180))
		for i := range g.Lon {
			w[j*len(g.Lon)+i] = c
			s += c
		}
	}
	for i := range w {
		w[i] /= s
	}
	return w
}

// MeanAndSpread returns, point by point, the mean and the standard deviation
// (population form, dividing by the number of models) of the fields.
func MeanAndSpread(fields [][]float64) (mean, std []float64, err error) {
	if len(fields) == 0 {
		return nil, nil, fmt.Errorf("compare: no fields")
	}
	n := len(fields[0])
	for k, f := range fields {
		if len(f) != n {
			return nil, nil, fmt.Errorf("compare: field %d has %d points, field 0 has %d", k, len(f), n)
		}
	}
	mean = make([]float64, n)
	std = make([]float64, n)
	m := float64(len(fields))
	for i := 0; i < n; i++ {
		var s float64
		for _, f := range fields {
			s += f[i]
		}
		mu := s / m
		var ss float64
		for _, f := range fields {
			d := f[i] - mu
			ss += d * d
		}
		mean[i], std[i] = mu, math.Sqrt(ss/m)
	}
	return mean, std, nil
}

// LevelForArea returns the value t such that the points with value below t
// cover the fraction frac of the area (weights summing to 1): the weighted
// frac-quantile of the field.
func LevelForArea(field, weights []float64, frac float64) (float64, error) {
	if !(frac > 0 && frac < 1) {
		return 0, fmt.Errorf("compare: area fraction %g outside (0, 1)", frac)
	}
	if len(field) != len(weights) || len(field) == 0 {
		return 0, fmt.Errorf("compare: %d values and %d weights", len(field), len(weights))
	}
	idx := make([]int, len(field))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return field[idx[a]] < field[idx[b]] })
	var acc float64
	for k, i := range idx {
		acc += weights[i]
		if acc >= frac {
			if k+1 < len(idx) {
				return 0.5 * (field[i] + field[idx[k+1]]), nil
			}
			return field[i], nil
		}
	}
	return field[idx[len(idx)-1]], nil
}

// VoteMap returns, for each point, the number of fields that place it in
// their slowest frac of the area (value below that field's LevelForArea):
// the vote maps of Lekic et al. (2012, EPSL 357-358, 68) with an area
// criterion.
func VoteMap(fields [][]float64, weights []float64, frac float64) ([]int, error) {
	if len(fields) == 0 {
		return nil, fmt.Errorf("compare: no fields")
	}
	votes := make([]int, len(fields[0]))
	for k, f := range fields {
		if len(f) != len(votes) {
			return nil, fmt.Errorf("compare: field %d has %d points, field 0 has %d", k, len(f), len(votes))
		}
		t, err := LevelForArea(f, weights, frac)
		if err != nil {
			return nil, err
		}
		for i, v := range f {
			if v < t {
				votes[i]++
			}
		}
	}
	return votes, nil
}
