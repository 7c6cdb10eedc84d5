package tomo

import (
	"fmt"
	"strings"
)

// role is what a column of a text or CSV file holds.
type role int

const (
	roleOther role = iota
	roleLon
	roleLat
	roleDepth
	roleRadius
	roleValue
)

func (r role) String() string {
	return [...]string{"other", "lon", "lat", "depth", "radius", "value"}[r]
}

// Column names recognised without being told (case-insensitive, after the
// units in brackets are removed).
var roleNames = map[string]role{
	"lon": roleLon, "long": roleLon, "lng": roleLon, "longitude": roleLon,
	"lon_deg": roleLon, "longitude_deg": roleLon,
	"lat": roleLat, "latitude": roleLat, "lat_deg": roleLat, "latitude_deg": roleLat,
	"depth": roleDepth, "dep": roleDepth, "depth_km": roleDepth,
	"radius": roleRadius, "rad": roleRadius, "r": roleRadius, "radius_km": roleRadius, "r_km": roleRadius,
}

// splitHeader splits a column title such as "dVs (%)" or "depth [km]" into
// its name ("dvs", lower case) and units ("%"), trimming spaces and quotes.
func splitHeader(h string) (name, units string) {
	h = strings.TrimSpace(strings.Trim(strings.TrimSpace(h), `"'`))
	for _, br := range []string{"()", "[]"} {
		if i := strings.IndexByte(h, br[0]); i > 0 && strings.HasSuffix(h, br[1:]) {
			units = strings.TrimSpace(h[i+1 : len(h)-1])
			h = strings.TrimSpace(h[:i])
			break
		}
	}
	return strings.ToLower(h), units
}

// columnPlan says which column holds what.
type columnPlan struct {
	lon, lat, vert, value int // column indices; vert is -1 without a depth axis
	radius                bool
	explicit              bool    // the vertical role came from a name or option
	vertPerKm             float64 // units of the vertical column per km (1, or 1000 for metres)
	name, units           string
}

// planColumns assigns roles to the column titles, honouring the names and
// the vertical role chosen in opts. It returns an error message (without
// location) when the columns cannot be assigned.
func planColumns(titles []string, opts ReadOptions) (columnPlan, error) {
	p := columnPlan{lon: -1, lat: -1, vert: -1, value: -1, vertPerKm: 1}
	names := make([]string, len(titles))
	units := make([]string, len(titles))
	for c, t := range titles {
		names[c], units[c] = splitHeader(t)
	}
	find := func(want string) int {
		want = strings.ToLower(strings.TrimSpace(want))
		for c, n := range names {
			if n == want || strings.ToLower(strings.TrimSpace(titles[c])) == want {
				return c
			}
		}
		return -1
	}
	pick := func(opt string, r1, r2 role, what string) (int, error) {
		if opt != "" {
			c := find(opt)
			if c < 0 {
				return -1, fmt.Errorf("no column named %q for the %s (columns: %s)", opt, what, strings.Join(titles, ", "))
			}
			return c, nil
		}
		found := -1
		for c, n := range names {
			r := roleNames[n]
			if r == r1 || (r2 != roleOther && r == r2) {
				if found >= 0 {
					return -1, fmt.Errorf("columns %q and %q both look like the %s; choose one explicitly", titles[found], titles[c], what)
				}
				found = c
			}
		}
		return found, nil
	}
	var err error
	if p.lon, err = pick(opts.LonName, roleLon, roleOther, "longitude"); err != nil {
		return p, err
	}
	if p.lon < 0 {
		return p, fmt.Errorf("no longitude column (looked for lon, longitude, long, lng; columns: %s); name it or choose it explicitly", strings.Join(titles, ", "))
	}
	if p.lat, err = pick(opts.LatName, roleLat, roleOther, "latitude"); err != nil {
		return p, err
	}
	if p.lat < 0 {
		return p, fmt.Errorf("no latitude column (looked for lat, latitude; columns: %s); name it or choose it explicitly", strings.Join(titles, ", "))
	}
	if p.vert, err = pick(opts.DepthName, roleDepth, roleRadius, "depth or radius"); err != nil {
		return p, err
	}
	if p.vert >= 0 {
		switch opts.Vertical {
		case "radius":
			p.radius, p.explicit = true, true
		case "depth":
			p.explicit = true
		case "":
			r := roleNames[names[p.vert]]
			p.radius = r == roleRadius
			p.explicit = r == roleRadius || r == roleDepth
		default:
			return p, fmt.Errorf("vertical coordinate %q not understood: use depth or radius", opts.Vertical)
		}
	}
	if p.vert >= 0 {
		switch strings.ToLower(units[p.vert]) {
		case "", "km", "kilometre", "kilometres", "kilometer", "kilometers":
		case "m", "metre", "metres", "meter", "meters":
			p.vertPerKm = 1000
		default:
			return p, fmt.Errorf("column %q: units %q of the depth or radius not understood; use km or m", titles[p.vert], units[p.vert])
		}
	}
	used := func(c int) bool { return c == p.lon || c == p.lat || c == p.vert }
	if opts.Var != "" {
		p.value = find(opts.Var)
		if p.value < 0 {
			return p, fmt.Errorf("no column named %q for the values (columns: %s)", opts.Var, strings.Join(titles, ", "))
		}
	} else {
		var cands []string
		for c := range titles {
			if !used(c) {
				cands = append(cands, titles[c])
				p.value = c
			}
		}
		switch len(cands) {
		case 0:
			return p, fmt.Errorf("no value column: every column is a coordinate (columns: %s)", strings.Join(titles, ", "))
		case 1:
		default:
			return p, fmt.Errorf("several candidate value columns (%s); choose one explicitly", strings.Join(cands, ", "))
		}
	}
	if used(p.value) {
		return p, fmt.Errorf("column %q cannot be both a coordinate and the values", titles[p.value])
	}
	p.name, p.units = names[p.value], units[p.value]
	return p, nil
}
