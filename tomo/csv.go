package tomo

import (
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"strings"
)

// ReadCSV reads a comma-separated grid with a header row (RFC 4180 quoting)
// from data; name is the file name used in error messages.
//
// Columns are recognised by their titles, case-insensitively and ignoring
// units in brackets ("depth (km)", "dVs [%]"): lon, long, lng, longitude;
// lat, latitude; depth, dep, depth_km; radius, rad, r, radius_km. The value
// column is the one remaining column; with several, opts.Var must choose
// one. opts.LonName, LatName, DepthName choose the coordinate columns by
// title instead, and opts.Vertical says whether the vertical column is a
// depth or a radius. Units in the value column's title become Grid.Units.
//
// Lines starting with '#' are comments; before the header they may carry
// the same "key: value" settings as a text grid (title, units, missing). An
// empty value field, NaN, NA, N/A and null mark missing values. The points
// are assembled into a regular grid exactly as by ReadText.
func ReadCSV(name string, data []byte, opts ReadOptions) (*Grid, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")) // UTF-8 byte-order mark
	if len(data) == 0 {
		return nil, inputErr(name, 0, "the file is empty")
	}
	b := &builder{file: name, missing: append([]float64(nil), opts.Missing...)}
	var title, units string
	// Settings in leading comment lines.
	for rest := data; len(rest) > 0; {
		end := bytes.IndexByte(rest, '\n')
		line := rest
		if end >= 0 {
			line, rest = rest[:end], rest[end+1:]
		} else {
			rest = nil
		}
		t := bytes.TrimSpace(line)
		if len(t) == 0 {
			continue
		}
		if t[0] != '#' {
			break
		}
		if key, val, ok := metaLine(t[1:]); ok {
			switch key {
			case "title":
				title = val
			case "units":
				units = val
			case "missing":
				v, ok := parseFloat([]byte(val))
				if !ok {
					return nil, inputErr(name, 0, "missing-value setting %q is not a number", val)
				}
				b.missing = append(b.missing, v)
			}
		}
	}

	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	r.ReuseRecord = true
	var lines []int32
	b.line = func(rec int) int {
		if rec >= 0 && rec < len(lines) {
			return int(lines[rec])
		}
		return 0
	}
	csvErr := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return inputErr(name, pe.Line, "character %d: %v", pe.Column, pe.Err)
		}
		return inputErr(name, 0, "%v", err)
	}
	header, err := r.Read()
	if err == io.EOF {
		return nil, inputErr(name, 0, "no header row (only comments or blank lines); a CSV grid starts with a row of column titles such as lon,lat,depth,dvs")
	}
	if err != nil {
		return nil, csvErr(err)
	}
	headLine, _ := r.FieldPos(0)
	titles := append([]string(nil), header...)
	for _, t := range titles {
		if _, ok := parseFloat([]byte(strings.TrimSpace(t))); ok && t != "" {
			return nil, inputErr(name, headLine, "the first row (%s) is numbers, not column titles; a CSV grid needs a header row such as lon,lat,depth,dvs", strings.Join(titles, ","))
		}
	}
	plan, err := planColumns(titles, opts)
	if err != nil {
		return nil, inputErr(name, headLine, "%v", err)
	}
	b.hasDepth = plan.vert >= 0
	b.radius, b.explicit = plan.radius, plan.explicit
	vertName := "depth"
	if plan.radius {
		vertName = "radius"
	}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(err)
		}
		line, _ := r.FieldPos(0)
		if len(rec) != len(titles) {
			if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
				continue // a line of spaces
			}
			return nil, inputErr(name, line, "%d fields, but the header (line %d) has %d columns", len(rec), headLine, len(titles))
		}
		lines = append(lines, int32(line))
		lon, err := coordField(name, line, strings.TrimSpace(rec[plan.lon]), plan.lon, titles[plan.lon])
		if err != nil {
			return nil, err
		}
		lat, err := coordField(name, line, strings.TrimSpace(rec[plan.lat]), plan.lat, titles[plan.lat])
		if err != nil {
			return nil, err
		}
		dep := 0.0
		if plan.vert >= 0 {
			if dep, err = coordField(name, line, strings.TrimSpace(rec[plan.vert]), plan.vert, vertName); err != nil {
				return nil, err
			}
			dep /= plan.vertPerKm
		}
		v, err := valueField(name, line, strings.TrimSpace(rec[plan.value]), plan.value)
		if err != nil {
			return nil, err
		}
		b.add(lon, lat, dep, v)
	}
	if len(lines) == 0 {
		return nil, inputErr(name, headLine, "a header row but no data rows")
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
