package main

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParsePoints(t *testing.T) {
	in := "\ufeff# hotspots, invented\n15 -5 first\n\n195\t8   # a comment\n-30,45\n  359.5 -90 pole and far east \n"
	pts, err := parsePoints("p.txt", []byte(in))
	if err != nil {
		t.Fatal(err)
	}
	want := []userPoint{{15, -5, "first", 2}, {195, 8, "", 4}, {-30, 45, "", 5}, {359.5, -90, "pole and far east", 6}}
	if len(pts) != len(want) {
		t.Fatalf("%d points, want %d: %+v", len(pts), len(want), pts)
	}
	for i := range want {
		if pts[i] != want[i] {
			t.Errorf("point %d: %+v, want %+v", i, pts[i], want[i])
		}
	}
}

func TestParsePointsErrors(t *testing.T) {
	cases := []struct{ in, want string }{
		{"10 20\n30\n", "p.txt:2: \"30\": want \"lon lat\""},
		{"# c\nx 20\n", "p.txt:2: longitude \"x\" is not a number"},
		{"10 y\n", "p.txt:1: latitude \"y\" is not a number"},
		{"10 95\n", "p.txt:1: latitude 95 is outside -90..90"},
		{"400 0\n", "p.txt:1: longitude 400 is outside -180..360"},
		{"NaN 0\n", "p.txt:1: longitude \"NaN\" is not finite"},
		{"0 -Inf\n", "p.txt:1: latitude \"-Inf\" is not finite"},
		{"# only comments\n\n", "p.txt: no points"},
		{"", "p.txt: no points"},
		{"1 2\x003\n", "p.txt: a NUL byte"},
	}
	for _, c := range cases {
		_, err := parsePoints("p.txt", []byte(c.in))
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%q: error %v, want it to start with %q", c.in, err, c.want)
			continue
		}
		if !errors.Is(err, errBadInput) || exitCode(err) != 2 {
			t.Errorf("%q: exit status %d, want 2", c.in, exitCode(err))
		}
	}
}

// FuzzParsePoints: any input gives points or an error naming the file,
// never a panic; points are finite and inside the accepted ranges.
func FuzzParsePoints(f *testing.F) {
	for _, s := range []string{"15 -5\n", "# x\n1,2 lab\n", "1e3 2", "-180 90\n360 -90", "\ufeff0 0", "a b", "1 2\r\n3 4\r\n"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		pts, err := parsePoints("f.txt", data)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "f.txt:") || exitCode(err) != 2 {
				t.Fatalf("error %q does not name the file or does not exit 2", err)
			}
			return
		}
		if len(pts) == 0 {
			t.Fatal("no points and no error")
		}
		for _, p := range pts {
			if math.IsNaN(p.Lon) || math.IsNaN(p.Lat) || p.Lat < -90 || p.Lat > 90 || p.Lon < -180 || p.Lon > 360 || p.Line < 1 {
				t.Fatalf("bad point %+v", p)
			}
		}
	})
}
