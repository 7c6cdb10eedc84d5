package main

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// userPoint is one line of a points file: a position and an optional
// label.
type userPoint struct {
	Lon, Lat float64 // degrees east and north; Lon as written
	Label    string  // the rest of the line after lon and lat, or ""
	Line     int     // 1-based line in the file
}

// maxPoints bounds the points of one file; the Monte Carlo test measures
// every point against every outline edge in each trial.
const maxPoints = 100000

// parsePoints reads a points file: one point per line as "lon lat" in
// degrees (east longitude, north latitude), separated by blanks, tabs or
// one comma, optionally followed by a label (the rest of the line). Blank
// lines and everything after a '#' are ignored. Longitudes may be given in
// -180..180 or 0..360. Errors name the file and line: a missing latitude,
// a number that does not parse or is not finite, a latitude outside
// -90..90, a longitude outside -180..360, a file with no points.
func parsePoints(name string, data []byte) ([]userPoint, error) {
	bad := func(line int, format string, args ...any) error {
		return inputErrorf("%s:%d: %s", name, line, fmt.Sprintf(format, args...))
	}
	if bytes.IndexByte(data, 0) >= 0 {
		return nil, inputErrorf("%s: a NUL byte: this is not a text file of lon lat lines", name)
	}
	var pts []userPoint
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 4096), 1<<20)
	n := 0
	for sc.Scan() {
		n++
		text := sc.Text()
		if n == 1 {
			text = strings.TrimPrefix(text, "\ufeff")
		}
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		text = strings.TrimSpace(text)
		if text == "" {
			continue
		}
		f := strings.FieldsFunc(text, func(r rune) bool { return r == ' ' || r == '\t' || r == ',' })
		if len(f) < 2 {
			return nil, bad(n, "%q: want \"lon lat\" (degrees), found one field", text)
		}
		lon, err1 := strconv.ParseFloat(f[0], 64)
		lat, err2 := strconv.ParseFloat(f[1], 64)
		switch {
		case err1 != nil:
			return nil, bad(n, "longitude %q is not a number", f[0])
		case err2 != nil:
			return nil, bad(n, "latitude %q is not a number", f[1])
		case math.IsNaN(lon) || math.IsInf(lon, 0):
			return nil, bad(n, "longitude %q is not finite", f[0])
		case math.IsNaN(lat) || math.IsInf(lat, 0):
			return nil, bad(n, "latitude %q is not finite", f[1])
		case lat < -90 || lat > 90:
			return nil, bad(n, "latitude %g is outside -90..90 (are lon and lat swapped? the order is lon lat)", lat)
		case lon < -180 || lon > 360:
			return nil, bad(n, "longitude %g is outside -180..360", lon)
		}
		if len(pts) == maxPoints {
			return nil, bad(n, "more than %d points", maxPoints)
		}
		label := ""
		if len(f) > 2 {
			label = strings.Join(f[2:], " ")
		}
		pts = append(pts, userPoint{Lon: lon, Lat: lat, Label: label, Line: n})
	}
	if err := sc.Err(); err != nil {
		return nil, bad(n+1, "%v", err)
	}
	if len(pts) == 0 {
		return nil, inputErrorf("%s: no points: want one \"lon lat\" line (degrees) per point, # for comments", name)
	}
	return pts, nil
}
