package tomo

import (
	"fmt"
	"math"
)

// poleTol is the spread, relative to the largest magnitude of the valid
// values on the pole row and the row next to it, above which the values
// of a pole row count as different (common practice: well above the
// rounding of values printed with four or more significant digits).
const poleTol = 1e-3

// poleWarning returns a warning when a grid row at latitude -90 or 90
// holds different values: all its longitudes are one point of the sphere,
// so a file that gives it several values contradicts itself (the same
// point with conflicting values, like a repeated seam column). It names
// the pole, the depth and the spread of the worst row, or returns "".
// The values are kept as they are; the warning is for the user.
func poleWarning(g *Grid) string {
	nlon := len(g.Lon)
	if nlon < 2 {
		return ""
	}
	worst, wk, wlat, wlo, whi, rows := 0.0, 0, 0.0, 0.0, 0.0, 0
	for k := range g.NDepth() {
		for j, lat := range g.Lat {
			if lat != 90 && lat != -90 {
				continue
			}
			lo, hi, n := math.Inf(1), math.Inf(-1), 0
			for i := range nlon {
				if v, ok := g.At(k, j, i); ok {
					lo, hi, n = math.Min(lo, v), math.Max(hi, v), n+1
				}
			}
			if n < 2 || !(hi > lo) {
				continue
			}
			// The scale: the largest magnitude on the pole row and the
			// row next to it (O(nlon), not a pass over the level).
			next := j + 1
			if lat > 0 {
				next = j - 1
			}
			scale := 0.0
			for _, jj := range []int{j, next} {
				if jj < 0 || jj >= len(g.Lat) {
					continue
				}
				for i := range nlon {
					if v, ok := g.At(k, jj, i); ok {
						scale = math.Max(scale, math.Abs(v))
					}
				}
			}
			if !(hi-lo > poleTol*scale) {
				continue
			}
			rows++
			if s := (hi - lo) / scale; s > worst {
				worst, wk, wlat, wlo, whi = s, k, lat, lo, hi
			}
		}
	}
	if rows == 0 {
		return ""
	}
	pole := "north"
	if wlat < 0 {
		pole = "south"
	}
	at := ""
	if g.Depth != nil {
		at = fmt.Sprintf(" at depth %g km", g.Depth[wk])
	}
	more := ""
	if rows > 1 {
		more = fmt.Sprintf(" (%d pole rows differ; this is the worst)", rows)
	}
	return fmt.Sprintf("the %d values at latitude %g%s range from %.6g to %.6g, yet they are all the %s pole, one point%s: the file contradicts itself there; check how it was made (the values are used as given)",
		nlon, wlat, at, wlo, whi, pole, more)
}
