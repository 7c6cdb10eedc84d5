package tomo

import (
	"bytes"
	"math"
	"testing"
)

// TestDemoVariantsLayout: the variants share the demo's grid, carry their
// own names and hashes, and come back identical from call to call.
func TestDemoVariantsLayout(t *testing.T) {
	d := Demo()
	vs := DemoVariants()
	if len(vs) != len(DemoVariantNames) {
		t.Fatalf("%d variants, want %d", len(vs), len(DemoVariantNames))
	}
	seen := map[string]bool{DemoName: true}
	for n, v := range vs {
		if v.Source.Path != DemoVariantNames[n] || seen[v.Source.Path] {
			t.Errorf("variant %d named %q", n, v.Source.Path)
		}
		seen[v.Source.Path] = true
		if len(v.Values) != len(d.Values) || v.Reg != d.Reg || v.Units != d.Units || len(v.Depth) != len(d.Depth) {
			t.Errorf("%s: layout differs from the demo", v.Source.Path)
		}
		if len(v.Source.SHA256) != 64 || v.Source.SHA256 == d.Source.SHA256 {
			t.Errorf("%s: sha256 %q", v.Source.Path, v.Source.SHA256)
		}
		var buf bytes.Buffer
		if err := WriteText(&buf, v); err != nil {
			t.Fatal(err)
		}
		back, err := ReadBytes(v.Source.Path+".txt", buf.Bytes(), ReadOptions{})
		if err != nil {
			t.Fatalf("%s does not read back: %v", v.Source.Path, err)
		}
		if back.Source.SHA256 != v.Source.SHA256 {
			t.Errorf("%s: sha256 of the written file %s, Source says %s", v.Source.Path, back.Source.SHA256, v.Source.SHA256)
		}
		// Every variant differs from the demo somewhere, by at least a
		// few tenths of a percent (the size of the structures changed).
		var most float64
		for i := range v.Values {
			most = math.Max(most, math.Abs(v.Values[i]-d.Values[i]))
		}
		if most < 0.3 {
			t.Errorf("%s differs from the demo by at most %g %%", v.Source.Path, most)
		}
	}
	again := DemoVariants()
	again[0].Values[0] = 99 // a copy: must not change the next call's grids
	third := DemoVariants()
	for n := range vs {
		for i := range vs[n].Values {
			if vs[n].Values[i] != third[n].Values[i] {
				t.Fatalf("%s: value %d changed between calls", vs[n].Source.Path, i)
			}
		}
	}
}

// TestDemoVariantBuildMatchesDemo: the variant builder with the demo's own
// parts reproduces the demo exactly, so the variants differ from it only in
// what they change.
func TestDemoVariantBuildMatchesDemo(t *testing.T) {
	d := Demo()
	g := variantBuild(demoLarge, demoSmall)
	for i := range d.Values {
		if g.Values[i] != d.Values[i] {
			t.Fatalf("value %d: %g, demo %g", i, g.Values[i], d.Values[i])
		}
	}
}

// TestDemoVariantTurned: "merle" is brindle turned DemoVariantShiftDeg
// east, so its value DemoVariantShiftDeg east of a grid point is brindle's
// at that point (a rotation about the axis moves every value along its
// parallel; 12 degrees is six 2-degree columns).
func TestDemoVariantTurned(t *testing.T) {
	d, m := Demo(), DemoVariants()[0]
	shift := int(DemoVariantShiftDeg / 2)
	nlon := d.NLon()
	for k := range d.Depth {
		for j := range d.Lat {
			for i := range d.Lon {
				a, _ := d.At(k, j, i)
				b, _ := m.At(k, j, (i+shift)%nlon)
				if a != b {
					t.Fatalf("depth %g, lat %g, lon %g: brindle %g, merle 12 degrees east %g", d.Depth[k], d.Lat[j], d.Lon[i], a, b)
				}
			}
		}
	}
}
