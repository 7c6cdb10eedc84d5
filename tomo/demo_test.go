package tomo

import (
	"bytes"
	"flag"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the demo files in testdata/demo from the code")

// demoFiles are the committed renderings of the demo scenario.
var demoFiles = []struct {
	name  string
	write func(*bytes.Buffer, *Grid) error
}{
	{"brindle.txt", func(b *bytes.Buffer, g *Grid) error { return WriteText(b, g) }},
	{"brindle.csv", func(b *bytes.Buffer, g *Grid) error { return WriteCSV(b, g) }},
}

// maxDemoFile is the size limit for committed demo files (2 MB).
const maxDemoFile = 2 << 20

// TestDemoFiles checks that the committed files in testdata/demo are
// exactly what the code generates (run with -update to rewrite them), that
// they stay small, and that reading them gives Demo() back bit for bit.
func TestDemoFiles(t *testing.T) {
	g := Demo()
	for _, f := range demoFiles {
		var buf bytes.Buffer
		if err := f.write(&buf, g); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("..", "testdata", "demo", f.name)
		if *update {
			if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test ./tomo -run TestDemoFiles -update)", err)
		}
		if !bytes.Equal(got, buf.Bytes()) {
			t.Errorf("%s differs from what Demo() generates; run go test ./tomo -run TestDemoFiles -update and review the diff", path)
		}
		if len(got) > maxDemoFile {
			t.Errorf("%s is %d bytes, over the %d limit", path, len(got), maxDemoFile)
		}
		h, err := ReadFile(path, ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(h.Values, g.Values) || !slices.Equal(h.Lon, g.Lon) || !slices.Equal(h.Lat, g.Lat) ||
			!slices.Equal(h.Depth, g.Depth) || h.Reg != CellRegistered || h.Units != UnitPercent || h.Name != "dvs" || h.Title != DemoTitle {
			t.Errorf("%s does not read back as Demo()", path)
		}
		if f.name == "brindle.txt" && h.Source.SHA256 != g.Source.SHA256 {
			t.Errorf("Demo().Source.SHA256 = %s, the text file's is %s", g.Source.SHA256, h.Source.SHA256)
		}
	}
}

// TestDemoScenario checks that the scenario has the features its
// documentation promises. Amplitude ranges are the trade's typical values
// (slow provinces about -1 to -3 %, fast regions +1 to +2 %: common
// practice, see Hernlund & Houser 2008, EPSL 265, 423).
func TestDemoScenario(t *testing.T) {
	g := Demo()
	if g.NLon() != 180 || g.NLat() != 90 || !slices.Equal(g.Depth, DemoDepths) || g.Valid != nil {
		t.Fatalf("demo grid shape %d x %d x %v", g.NLon(), g.NLat(), g.Depth)
	}
	deep := g.NDepth() - 1
	at := func(k int, lon, lat float64) float64 {
		i := int(math.Floor(lon / 2))
		j := int(math.Floor((lat + 90) / 2))
		v, _ := g.At(k, j, i)
		return v
	}
	// Two slow provinces, about 180 degrees apart in longitude, near the
	// equator; the first is larger (more area below -1 %).
	if v := at(deep, demoBroad.lon, demoBroad.lat); v > -2 {
		t.Errorf("broad province centre %g %%, want below -2 %%", v)
	}
	if v := at(deep, demoRound.lon, demoRound.lat); v > -1.5 {
		t.Errorf("round province centre %g %%, want below -1.5 %%", v)
	}
	if d := math.Abs(demoRound.lon - demoBroad.lon); math.Abs(d-180) > 10 || math.Abs(demoBroad.lat) > 15 || math.Abs(demoRound.lat) > 15 {
		t.Errorf("province centres not antipodal-equatorial: %v %v", demoBroad, demoRound)
	}
	areaBelow := func(lon0 float64) float64 {
		// Area (fraction of the sphere) below -1 % within 90 degrees of lon0 on the deepest level.
		w := rowWeights(g.Lat)
		a := 0.0
		for j := range g.Lat {
			for i, lon := range g.Lon {
				v, _ := g.At(deep, j, i)
				if v < -1 && angDist(lon, 0, lon0, 0) < 90 {
					a += w[j] / float64(g.NLon())
				}
			}
		}
		return a
	}
	if a1, a2 := areaBelow(demoBroad.lon), areaBelow(demoRound.lon); !(a1 > 1.3*a2 && a2 > 0.01) {
		t.Errorf("slow areas %g (broad) and %g (round): want the broad one clearly larger", a1, a2)
	}
	// The fast belt between them, on the equator 90 degrees from each.
	for _, lon := range []float64{demoBroad.lon + 90, demoBroad.lon + 270} {
		if v := at(deep, math.Mod(lon, 360), 0); v < 1 {
			t.Errorf("belt at lon %g: %g %%, want above +1 %%", lon, v)
		}
	}
	// Extremes and the strengthening towards the CMB.
	plane := g.NLat() * g.NLon()
	prev := 0.0
	for k := range g.Depth {
		lo, hi := slices.Min(g.Values[k*plane:(k+1)*plane]), slices.Max(g.Values[k*plane:(k+1)*plane])
		m, _ := weightedMean(g.Values[k*plane:(k+1)*plane], nil, g.Lat, g.NLon())
		var ss float64
		for _, v := range g.Values[k*plane : (k+1)*plane] {
			ss += (v - m) * (v - m)
		}
		rms := math.Sqrt(ss / float64(plane))
		if rms <= prev {
			t.Errorf("rms %g at %g km not above %g of the level above", rms, g.Depth[k], prev)
		}
		prev = rms
		if k == deep && (lo < -3.5 || lo > -2 || hi < 1 || hi > 2.5) {
			t.Errorf("deepest level range %g..%g %%", lo, hi)
		}
	}
	// Each call returns an independent copy.
	g.Values[0] = 99
	if Demo().Values[0] == 99 {
		t.Error("Demo() shares its values between calls")
	}
}
