package compare

import (
	"math"
	"testing"
)

// TestAreaWeightsZone: on a regular grid the weight of the band |lat| < 30
// is sin(30 deg) = 1/2 of the sphere (area of a zone, 2 pi R^2 (sin b - sin
// a); Archimedes' hat-box theorem), up to the midpoint-rule error of a
// 1-degree cell-centred grid.
func TestAreaWeightsZone(t *testing.T) {
	g := Grid{}
	for i := 0; i < 360; i++ {
		g.Lon = append(g.Lon, float64(i)+0.5)
	}
	for j := 0; j < 180; j++ {
		g.Lat = append(g.Lat, -89.5+float64(j))
	}
	w := g.AreaWeights()
	var band float64
	for j, lat := range g.Lat {
		if math.Abs(lat) < 30 {
			for i := range g.Lon {
				band += w[j*len(g.Lon)+i]
			}
		}
	}
	if math.Abs(band-0.5) > 1e-4 {
		t.Errorf("band |lat| < 30 has weight %g, want 0.5", band)
	}
}

// TestVoteMapCounts: three fields, two of which place the same half of the
// points in their slowest half, give 2 or 3 votes exactly where expected
// (definition of the vote map, Lekic et al. 2012).
func TestVoteMapCounts(t *testing.T) {
	w := []float64{0.25, 0.25, 0.25, 0.25}
	fields := [][]float64{
		{-2, -1, 1, 2},
		{-3, -2, 0, 1},
		{1, -1, -2, 3},
	}
	votes, err := VoteMap(fields, w, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	want := []int{2, 3, 1, 0}
	for i := range want {
		if votes[i] != want[i] {
			t.Fatalf("votes %v, want %v", votes, want)
		}
	}
	mean, std, _ := MeanAndSpread(fields)
	if math.Abs(mean[0]+4.0/3) > 1e-15 || math.Abs(std[3]-math.Sqrt(2.0/3)) > 1e-15 {
		t.Errorf("mean %v std %v", mean, std)
	}
}
