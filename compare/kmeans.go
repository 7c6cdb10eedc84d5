package compare

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// KMeansResult is a partition of weighted points into K clusters.
type KMeansResult struct {
	// Labels[i] is the cluster of point i. Clusters are numbered by the
	// mean of their centre's coordinates, ascending: for dlnVs (one value or
	// a depth profile per point), cluster 0 is the slowest.
	Labels []int
	// Centers[k] is the weighted mean of the points in cluster k.
	Centers [][]float64
	// Inertia is the weighted sum of squared distances of the points to
	// their centres.
	Inertia float64
	// Iterations is the number of Lloyd iterations of the best restart.
	Iterations int
}

// KMeans partitions the points x[i] (all of the same dimension) into k
// clusters by Lloyd's algorithm (Lloyd 1982, IEEE Trans. Inf. Theory 28, 129)
// minimising the weighted within-cluster sum of squares, with k-means++
// seeding (Arthur & Vassilvitskii 2007) and restarts; the best restart is
// kept. weights (nil for equal weights) are typically the areas the points
// stand for. The seed makes the result reproducible. This is the cluster
// analysis of Lekic et al. (2012, EPSL 357-358, 68) when x holds depth
// profiles of dVs, and of single values when x holds one layer.
func KMeans(x [][]float64, weights []float64, k, restarts int, seed uint64) (*KMeansResult, error) {
	n := len(x)
	if k < 1 {
		return nil, fmt.Errorf("compare: k-means needs k >= 1, got %d", k)
	}
	if n < k {
		return nil, fmt.Errorf("compare: k-means with k = %d needs at least %d points, got %d", k, k, n)
	}
	dim := len(x[0])
	for i, p := range x {
		if len(p) != dim {
			return nil, fmt.Errorf("compare: point %d has dimension %d, point 0 has %d", i, len(p), dim)
		}
	}
	if weights != nil && len(weights) != n {
		return nil, fmt.Errorf("compare: %d weights for %d points", len(weights), n)
	}
	w := func(i int) float64 {
		if weights == nil {
			return 1
		}
		return weights[i]
	}
	if restarts < 1 {
		restarts = 1
	}
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	var best *KMeansResult
	d2 := make([]float64, n)
	for r := 0; r < restarts; r++ {
		// k-means++ seeding: the first centre at a weighted random point,
		// each next one with probability proportional to weight times the
		// squared distance to the nearest centre chosen so far.
		centers := make([][]float64, 0, k)
		centers = append(centers, append([]float64(nil), x[pickWeighted(rng, n, w)]...))
		for len(centers) < k {
			var tot float64
			for i := range x {
				d2[i] = math.Inf(1)
				for _, c := range centers {
					d2[i] = math.Min(d2[i], sqDist(x[i], c))
				}
				tot += w(i) * d2[i]
			}
			var next int
			if tot == 0 {
				next = rng.IntN(n)
			} else {
				u := rng.Float64() * tot
				for next = 0; next < n-1; next++ {
					u -= w(next) * d2[next]
					if u <= 0 {
						break
					}
				}
			}
			centers = append(centers, append([]float64(nil), x[next]...))
		}
		labels := make([]int, n)
		for i := range labels {
			labels[i] = -1
		}
		var it int
		var inertia float64
		for it = 1; it <= 300; it++ {
			changed := false
			inertia = 0
			for i, p := range x {
				bi, bd := 0, math.Inf(1)
				for c, cen := range centers {
					if d := sqDist(p, cen); d < bd {
						bi, bd = c, d
					}
				}
				if labels[i] != bi {
					labels[i] = bi
					changed = true
				}
				inertia += w(i) * bd
			}
			// Update the centres as weighted means; an empty cluster keeps
			// its centre.
			sums := make([][]float64, k)
			ws := make([]float64, k)
			for c := range sums {
				sums[c] = make([]float64, dim)
			}
			for i, p := range x {
				c := labels[i]
				ws[c] += w(i)
				for d, v := range p {
					sums[c][d] += w(i) * v
				}
			}
			for c := range centers {
				if ws[c] > 0 {
					for d := range centers[c] {
						centers[c][d] = sums[c][d] / ws[c]
					}
				}
			}
			if !changed {
				break
			}
		}
		if best == nil || inertia < best.Inertia {
			best = &KMeansResult{Labels: labels, Centers: centers, Inertia: inertia, Iterations: it}
		}
	}
	// Number clusters by the mean coordinate of their centre.
	order := make([]int, k)
	key := make([]float64, k)
	for i := range order {
		order[i] = i
		key[i] = mean(best.Centers[i])
	}
	sort.SliceStable(order, func(a, b int) bool { return key[order[a]] < key[order[b]] })
	rank := make([]int, k)
	centers := make([][]float64, k)
	for newIdx, old := range order {
		rank[old] = newIdx
		centers[newIdx] = best.Centers[old]
	}
	for i := range best.Labels {
		best.Labels[i] = rank[best.Labels[i]]
	}
	best.Centers = centers
	return best, nil
}

func pickWeighted(rng *rand.Rand, n int, w func(int) float64) int {
	var tot float64
	for i := 0; i < n; i++ {
		tot += w(i)
	}
	u := rng.Float64() * tot
	for i := 0; i < n; i++ {
		u -= w(i)
		if u <= 0 {
			return i
		}
	}
	return n - 1
}

func sqDist(a, b []float64) float64 {
	var s float64
	for i := range a {
		d := a[i] - b[i]
		s += d * d
	}
	return s
}
