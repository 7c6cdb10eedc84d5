package figure

import (
	"bytes"
	"context"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"
)

// TestChromiumRendersSVG opens the SVG map in headless Chromium (Debian's
// chromium package) and checks from a screenshot that the browser draws
// the embedded raster, not only the vectors: both ends of the colour
// scale must be present in quantity. Skipped without chromium, except
// under CI=true, where it fails.
func TestChromiumRendersSVG(t *testing.T) {
	bin, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("chromium not found; CI needs Debian's chromium package")
		}
		t.Skip("chromium not found (apt-get install -y chromium)")
	}
	dir := t.TempDir()
	svg, err := SVG(demoMap())
	if err != nil {
		t.Fatal(err)
	}
	// A page that shows the SVG at its size in CSS pixels.
	page := []byte(`<!DOCTYPE html><html><head><meta charset="utf-8"><style>body{margin:0}</style></head>` +
		`<body><img src="map.svg" width="900" height="540"></body></html>`)
	if err := os.WriteFile(filepath.Join(dir, "map.svg"), svg, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "page.html"), page, 0o644); err != nil {
		t.Fatal(err)
	}
	shot := filepath.Join(dir, "shot.png")
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin,
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--disable-dev-shm-usage", "--hide-scrollbars", "--user-data-dir="+filepath.Join(dir, "profile"),
		"--window-size=900,540", "--virtual-time-budget=10000", "--screenshot="+shot,
		"file://"+filepath.Join(dir, "page.html"))
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, stderr.String())
	}
	f, err := os.Open(shot)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	lowEnd, highEnd := Diverging(-0.9), Diverging(0.6)
	nLow, nHigh := 0, 0
	near := func(r, g, b uint32, c [3]uint8) bool {
		d := func(a uint32, b uint8) int { return int(a>>8) - int(b) }
		return abs(d(r, c[0])) < 14 && abs(d(g, c[1])) < 14 && abs(d(b, c[2])) < 14
	}
	bb := img.Bounds()
	for y := bb.Min.Y; y < bb.Max.Y; y++ {
		for x := bb.Min.X; x < bb.Max.X; x++ {
			r, g, b, _ := img.At(x, y).RGBA()
			if near(r, g, b, [3]uint8{lowEnd.R, lowEnd.G, lowEnd.B}) {
				nLow++
			}
			if near(r, g, b, [3]uint8{highEnd.R, highEnd.G, highEnd.B}) {
				nHigh++
			}
		}
	}
	if nLow < 300 || nHigh < 100 {
		t.Errorf("screenshot has %d pixels near the low-end colour and %d near the high-end colour: raster not drawn", nLow, nHigh)
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
