package tomo

import (
	"bytes"
	"fmt"
	"math"
	"strings"
)

// ReadText reads a whitespace-separated text grid from data; name is the
// file name used in error messages ("-" for standard input).
//
// Each data line holds "lon lat value" or "lon lat depth value" (degrees
// east, degrees north, km, value), separated by spaces or tabs, in any
// order of points. Everything after '#' is a comment. Comment lines before
// the first data line may carry "key: value" settings:
//
//	# title: a one-line description
//	# columns: lon lat radius dvs   (column names, in the order of the columns)
//	# units: percent                 (units of the values)
//	# missing: -999                  (a missing-value sentinel, besides NaN)
//
// With a "# columns:" line the columns may come in any order and are
// recognised by name as in ReadCSV. NaN, NA, N/A and null mark missing
// values.
//
// The points are assembled into a regular grid: longitudes in either the
// 0..360 or the -180..180 convention (not both) are wrapped to [0, 360), a
// repeated seam column (0 and 360, or -180 and 180) is merged when its
// values are equal, and latitudes may come in either order. Every
// longitude, latitude (and depth) combination must appear exactly once;
// identical repeated points are merged with a warning. Longitudes must
// cover the globe at a constant spacing; latitudes must be evenly spaced
// but may stop short of the poles (with a warning).
//
// Registration rule: the grid is cell-registered when its coordinates sit
// at half steps, every latitude at -90 + (j + 1/2)*dlat (so that no point
// lies on a pole) and every longitude at (i + 1/2)*dlon; node-registered
// otherwise. Lon and Lat always hold the actual coordinates, so a grid
// that fits neither pattern exactly (say half steps in latitude but whole
// steps in longitude, labelled node) is still described correctly by
// them; consumers should use Lon and Lat rather than infer them from Reg.
func ReadText(name string, data []byte, opts ReadOptions) (*Grid, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")) // UTF-8 byte-order mark
	b := &builder{file: name, missing: append([]float64(nil), opts.Missing...)}
	b.line = func(rec int) int { return textRecordLine(data, rec) }
	b.reserve(bytes.Count(data, []byte{'\n'}) + 1)
	var (
		plan       *columnPlan
		titles     []string // from "# columns:"
		title      string
		units      string
		lineNo     int
		firstData  int
		fields     [16][]byte
		ncols      int
		haveHeader bool
	)
	for pos := 0; pos < len(data); {
		end := bytes.IndexByte(data[pos:], '\n')
		var line []byte
		if end < 0 {
			line, pos = data[pos:], len(data)
		} else {
			line, pos = data[pos:pos+end], pos+end+1
		}
		lineNo++
		if c := bytes.IndexByte(line, '#'); c >= 0 {
			if plan == nil {
				key, val, ok := metaLine(line[c+1:])
				if ok {
					switch key {
					case "title":
						title = val
					case "units":
						units = val
					case "columns":
						titles = strings.Fields(val)
						haveHeader = true
					case "missing":
						v, ok := parseFloat([]byte(val))
						if !ok {
							return nil, inputErr(name, lineNo, "missing-value setting %q is not a number", val)
						}
						b.missing = append(b.missing, v)
					}
				}
			}
			line = line[:c]
		}
		// Split into fields.
		nf := 0
		for i := 0; i < len(line); {
			for i < len(line) && isSpace(line[i]) {
				i++
			}
			if i == len(line) {
				break
			}
			j := i
			for j < len(line) && !isSpace(line[j]) {
				j++
			}
			if nf < len(fields) {
				fields[nf] = line[i:j]
			}
			nf++
			i = j
		}
		if nf == 0 {
			continue
		}
		if nf > len(fields) {
			return nil, inputErr(name, lineNo, "%d fields: too many columns for a text grid", nf)
		}
		if plan == nil {
			firstData = lineNo
			if allWords(fields[:nf]) {
				return nil, inputErr(name, lineNo, "a row of words (%s) where numbers were expected: a text grid has no header row; make it a comment ('# columns: %s') or save the file as CSV", bytes.Join(fields[:nf], []byte(" ")), bytes.Join(fields[:nf], []byte(" ")))
			}
			p, err := textPlan(nf, titles, haveHeader, opts)
			if err != nil {
				return nil, inputErr(name, lineNo, "%v", err)
			}
			plan = &p
			ncols = nf
			b.hasDepth = p.vert >= 0
			b.radius, b.explicit = p.radius, p.explicit
		}
		if nf != ncols {
			return nil, inputErr(name, lineNo, "%d fields, but line %d has %d; every data line must have the same columns", nf, firstData, ncols)
		}
		lon, err := coordField(name, lineNo, fields[plan.lon], plan.lon, "lon")
		if err != nil {
			return nil, err
		}
		lat, err := coordField(name, lineNo, fields[plan.lat], plan.lat, "lat")
		if err != nil {
			return nil, err
		}
		dep := 0.0
		if plan.vert >= 0 {
			what := "depth"
			if plan.radius {
				what = "radius"
			}
			if dep, err = coordField(name, lineNo, fields[plan.vert], plan.vert, what); err != nil {
				return nil, err
			}
			dep /= plan.vertPerKm
		}
		v, err := valueField(name, lineNo, fields[plan.value], plan.value)
		if err != nil {
			return nil, err
		}
		b.add(lon, lat, dep, v)
	}
	if len(data) == 0 {
		return nil, inputErr(name, 0, "the file is empty")
	}
	if plan == nil {
		return nil, inputErr(name, lineNo, "no data lines (only comments or blank lines); expected lines of 'lon lat value' or 'lon lat depth value'")
	}
	g, err := b.build()
	if err != nil {
		return nil, err
	}
	g.Title = title
	g.Name = plan.name
	g.Units = units
	if g.Units == "" {
		g.Units = plan.units
	}
	return g, nil
}

// allWords reports whether no field is a number or a missing-value token.
func allWords(f [][]byte) bool {
	for _, b := range f {
		if _, ok := parseFloat(b); ok || isMissingToken(b) {
			return false
		}
	}
	return true
}

// textPlan assigns column roles for a text file with nf fields.
func textPlan(nf int, titles []string, haveHeader bool, opts ReadOptions) (columnPlan, error) {
	if haveHeader {
		if len(titles) != nf {
			return columnPlan{}, fmt.Errorf("%d fields, but the '# columns:' line names %d columns", nf, len(titles))
		}
		return planColumns(titles, opts)
	}
	switch nf {
	case 3:
		return columnPlan{lon: 0, lat: 1, vert: -1, value: 2, vertPerKm: 1}, nil
	case 4:
		p := columnPlan{lon: 0, lat: 1, vert: 2, value: 3, vertPerKm: 1}
		switch opts.Vertical {
		case "radius":
			p.radius, p.explicit = true, true
		case "depth":
			p.explicit = true
		case "":
		default:
			return p, fmt.Errorf("vertical coordinate %q not understood: use depth or radius", opts.Vertical)
		}
		return p, nil
	}
	return columnPlan{}, fmt.Errorf("%d fields: a text grid has 3 columns (lon lat value) or 4 (lon lat depth value), or names its columns in a '# columns:' comment", nf)
}

// metaLine parses the text after '#' as "key: value" or "key = value" for
// the keys ReadText knows.
func metaLine(c []byte) (key, val string, ok bool) {
	s := strings.TrimSpace(string(c))
	i := strings.IndexAny(s, ":=")
	if i <= 0 {
		return "", "", false
	}
	key = strings.ToLower(strings.TrimSpace(s[:i]))
	switch key {
	case "title", "units", "columns", "missing":
		return key, strings.TrimSpace(s[i+1:]), true
	}
	return "", "", false
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\v' || c == '\f' }

// coordField parses a coordinate field (column col, 0-based).
func coordField[T string | []byte](file string, line int, f T, col int, what string) (float64, error) {
	v, ok := parseFloat(f)
	if !ok {
		return 0, inputErr(file, line, "column %d (%s): %q is not a number", col+1, what, f)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, inputErr(file, line, "column %d (%s): %q is not a usable coordinate; coordinates must be finite numbers", col+1, what, f)
	}
	return v, nil
}

// valueField parses a value field; NaN and the missing tokens give NaN.
func valueField[T string | []byte](file string, line int, f T, col int) (float64, error) {
	v, ok := parseFloat(f)
	if !ok {
		if isMissingToken(f) || len(f) == 0 {
			return math.NaN(), nil
		}
		return 0, inputErr(file, line, "column %d (value): %q is not a number (write NaN for missing data)", col+1, f)
	}
	if math.IsInf(v, 0) {
		return 0, inputErr(file, line, "column %d (value): %q is infinite; write NaN for missing data", col+1, f)
	}
	return v, nil
}

// textRecordLine returns the 1-based line number of the rec-th data line
// (0-based) of a text file, by scanning it again (used for error messages
// only).
func textRecordLine(data []byte, rec int) int {
	n, lineNo := 0, 0
	for pos := 0; pos < len(data); {
		end := bytes.IndexByte(data[pos:], '\n')
		var line []byte
		if end < 0 {
			line, pos = data[pos:], len(data)
		} else {
			line, pos = data[pos:pos+end], pos+end+1
		}
		lineNo++
		if c := bytes.IndexByte(line, '#'); c >= 0 {
			line = line[:c]
		}
		blank := true
		for _, c := range line {
			if !isSpace(c) {
				blank = false
				break
			}
		}
		if blank {
			continue
		}
		if n == rec {
			return lineNo
		}
		n++
	}
	return 0
}
