package tomo

import (
	"bufio"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode"
)

// WriteText writes g as a text grid that ReadText reads back to the same
// values: "# title:", "# columns:" and "# units:" comment lines, then one
// line per point, "lon lat value" or "lon lat depth value", depth level by
// depth level, latitudes from south to north, longitudes eastward. Numbers
// are written in the shortest form that reads back exactly; missing points
// as NaN.
func WriteText(w io.Writer, g *Grid) error {
	return writeGrid(w, g, ' ', "# ")
}

// WriteCSV writes g as a CSV grid that ReadCSV reads back to the same
// values: "# title:" and "# units:" comment lines, a header row
// "lon,lat[,depth],NAME", then the points in the order of WriteText.
func WriteCSV(w io.Writer, g *Grid) error {
	return writeGrid(w, g, ',', "")
}

func writeGrid(w io.Writer, g *Grid, sep byte, colPrefix string) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	name := g.Name
	name = strings.Map(func(r rune) rune {
		if r == ',' || r == '"' || r == '#' || unicode.IsSpace(r) || !unicode.IsPrint(r) {
			return '_'
		}
		return r
	}, name)
	if name == "" {
		name = "value"
	}
	if g.Title != "" {
		bw.WriteString("# title: " + strings.Join(strings.Fields(g.Title), " ") + "\n")
	}
	if g.Units != "" {
		bw.WriteString("# units: " + strings.Join(strings.Fields(g.Units), " ") + "\n")
	}
	cols := []string{"lon", "lat"}
	if g.Depth != nil {
		cols = append(cols, "depth")
	}
	cols = append(cols, name)
	if sep == ' ' {
		bw.WriteString(colPrefix + "columns:")
		for _, c := range cols {
			bw.WriteString(" " + c)
		}
	} else {
		for n, c := range cols {
			if n > 0 {
				bw.WriteByte(sep)
			}
			bw.WriteString(c)
		}
	}
	bw.WriteByte('\n')
	buf := make([]byte, 0, 96)
	num := func(v float64) {
		if math.IsNaN(v) {
			buf = append(buf, "NaN"...)
			return
		}
		buf = strconv.AppendFloat(buf, v, 'g', -1, 64)
	}
	for k := 0; k < g.NDepth(); k++ {
		for j, lat := range g.Lat {
			for i, lon := range g.Lon {
				v, ok := g.At(k, j, i)
				if !ok {
					v = math.NaN()
				}
				buf = buf[:0]
				num(lon)
				buf = append(buf, sep)
				num(lat)
				buf = append(buf, sep)
				if g.Depth != nil {
					num(g.Depth[k])
					buf = append(buf, sep)
				}
				num(v)
				buf = append(buf, '\n')
				if _, err := bw.Write(buf); err != nil {
					return err
				}
			}
		}
	}
	return bw.Flush()
}
