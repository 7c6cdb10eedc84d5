package tomo

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"testing"
	"time"
)

// benchGrid returns a cell-registered global grid of spacing d degrees with
// nd depth levels, values of a smooth invented field in percent rounded to
// 0.0001 %, written as text or CSV.
func benchGrid(d float64, nd int, csv bool) []byte {
	nlon, nlat := int(360/d), int(180/d)
	g := &Grid{Lon: steps(d/2, d, nlon), Lat: steps(-90+d/2, d, nlat), Depth: steps(2891-float64(nd-1)*15, 15, nd), Name: "dvs", Units: "percent"}
	g.Values = make([]float64, nd*nlat*nlon)
	for k := range nd {
		for j, la := range g.Lat {
			for i, lo := range g.Lon {
				v := 2 * math.Sin(3*lo*math.Pi/180) * math.Cos(2*la*math.Pi/180) * (1 + float64(k)/float64(nd))
				g.Values[g.Index(k, j, i)] = math.Round(v*1e4) / 1e4
			}
		}
	}
	var buf bytes.Buffer
	if csv {
		WriteCSV(&buf, g)
	} else {
		WriteText(&buf, g)
	}
	return buf.Bytes()
}

// BenchmarkReadText reads global text grids; the target is at least
// 30 MB/s for the 0.5-degree grid with 20 depth levels (about 140 MB).
func BenchmarkReadText(b *testing.B) {
	for _, c := range []struct {
		d  float64
		nd int
	}{{2, 5}, {1, 10}, {0.5, 20}} {
		data := benchGrid(c.d, c.nd, false)
		b.Run(fmt.Sprintf("%gdeg_%dlevels", c.d, c.nd), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			c0 := cpuTime()
			for b.Loop() {
				if _, err := ReadText("bench.txt", data, ReadOptions{}); err != nil {
					b.Fatal(err)
				}
			}
			reportCPU(b, c0, len(data))
		})
	}
}

// reportCPU adds the metric "MB/cpu-s": bytes read per second of process
// CPU time (all threads, garbage collection included). On a shared,
// loaded machine it is steadier than the wall-clock MB/s.
func reportCPU(b *testing.B, c0 time.Duration, size int) {
	if c := cpuTime() - c0; c > 0 {
		b.ReportMetric(float64(size)*float64(b.N)/1e6/c.Seconds(), "MB/cpu-s")
	}
}

// BenchmarkReadCSV reads a 1-degree CSV grid with 10 levels.
func BenchmarkReadCSV(b *testing.B) {
	data := benchGrid(1, 10, true)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	c0 := cpuTime()
	for b.Loop() {
		if _, err := ReadCSV("bench.csv", data, ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	reportCPU(b, c0, len(data))
}

// BenchmarkParseFloat compares the fast decimal path with strconv on the
// numbers of a grid file.
func BenchmarkParseFloat(b *testing.B) {
	fields := bytes.Fields(benchGrid(2, 1, false)[:1<<16])
	b.Run("fast", func(b *testing.B) {
		for b.Loop() {
			for _, f := range fields {
				parseFloat(f)
			}
		}
	})
	b.Run("strconv", func(b *testing.B) {
		for b.Loop() {
			for _, f := range fields {
				strconv.ParseFloat(string(f), 64)
			}
		}
	})
}

// BenchmarkSelectLayer averages the 20 levels of a 0.5-degree grid.
func BenchmarkSelectLayer(b *testing.B) {
	g, err := ReadText("bench.txt", benchGrid(0.5, 20, false), ReadOptions{})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := SelectLayer(g, LayerOptions{Top: 2000, Bottom: 2891}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSafeDegree estimates the degree limit of 0.5-degree layers with
// a 10-degree polar cap missing and with a sprinkled mask (fixed pattern)
// that forces the coarse search.
func BenchmarkSafeDegree(b *testing.B) {
	for _, c := range []struct {
		name string
		keep func(lon, lat float64) bool
	}{
		{"cap", func(lon, lat float64) bool { return lat < 80 }},
		{"sprinkled", func(lon, lat float64) bool { return int(lon*7+lat*13)%3 != 0 }},
	} {
		l := maskedLayer(0.5, c.keep)
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				SafeDegree(l)
			}
		})
	}
}
