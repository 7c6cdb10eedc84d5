package report

import (
	"bytes"
	"context"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// chromium returns the path of Debian's chromium, skipping the test when it
// is missing, except under CI=true where a missing browser fails the test.
func chromium(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if os.Getenv("CI") == "true" {
		t.Fatal("chromium not found; CI needs Debian's chromium package")
	}
	t.Skip("chromium not found (apt-get install -y chromium)")
	return ""
}

// runChromium runs headless Chromium with a fresh profile and no network
// services on the page at path, with the extra arguments, and returns
// its standard output.
func runChromium(t *testing.T, bin, path string, extra ...string) []byte {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	args := []string{
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--disable-dev-shm-usage", "--hide-scrollbars",
		"--user-data-dir=" + t.TempDir(),
	}
	args = append(args, extra...)
	args = append(args, "file://"+path)
	cmd := exec.CommandContext(ctx, bin, args...)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %v: %v\n%s", extra, err, stderr.String())
	}
	return stdout.Bytes()
}

// probe is a script added to a test copy of the report (the report itself
// carries no script): it records load errors of any element and, after
// the load event, writes every image's natural size and completeness into
// the DOM for --dump-dom to show.
const probe = `<script>
var probeErrors = [];
window.addEventListener('error', function (e) {
  probeErrors.push(e.message || (e.target && e.target.tagName) || 'error');
}, true);
window.addEventListener('load', function () {
  var out = [];
  document.querySelectorAll('img').forEach(function (im) {
    out.push(im.naturalWidth + 'x' + im.naturalHeight + (im.complete ? ':ok' : ':pending'));
  });
  var p = document.createElement('pre');
  p.id = 'probe';
  p.textContent = 'images=' + out.join(',') + ' errors=' + probeErrors.length + ' ' + probeErrors.join('|');
  document.body.appendChild(p);
});
</script>
`

// TestChromiumLoadsReport loads the report in headless Chromium: every
// figure decodes to its natural size with no load error, and a screenshot
// of the page as written (with its content security policy in force)
// shows the figures' colours rather than a blank page.
func TestChromiumLoadsReport(t *testing.T) {
	bin := chromium(t)
	dir := t.TempDir()
	r := demoReport(t)
	s := render(t, r)

	// Probe copy: the policy forbids scripts, so it is taken out here.
	csp := regexp.MustCompile(`<meta http-equiv="Content-Security-Policy"[^>]*>\n`)
	if !csp.MatchString(s) {
		t.Fatal("report has no content security policy")
	}
	probed := csp.ReplaceAllString(s, "")
	probed = strings.Replace(probed, "<meta charset=\"utf-8\">\n", "<meta charset=\"utf-8\">\n"+probe, 1)
	pp := filepath.Join(dir, "probe.html")
	if err := os.WriteFile(pp, []byte(probed), 0o644); err != nil {
		t.Fatal(err)
	}
	dom := string(runChromium(t, bin, pp, "--dump-dom", "--virtual-time-budget=10000"))
	m := regexp.MustCompile(`<pre id="probe">images=([^ ]*) errors=(\d+)([^<]*)</pre>`).FindStringSubmatch(dom)
	if m == nil {
		t.Fatalf("probe output missing from the DOM:\n%.2000s", dom)
	}
	if m[2] != "0" {
		t.Errorf("page reported %s load errors: %s", m[2], m[3])
	}
	imgs := strings.Split(m[1], ",")
	if len(imgs) != len(r.Figures) {
		t.Fatalf("DOM has %d images, want %d (%s)", len(imgs), len(r.Figures), m[1])
	}
	if imgs[0] != "900x540:ok" {
		t.Errorf("map image: %s, want 900x540:ok", imgs[0])
	}
	for i, im := range imgs {
		var w, h int
		wh := strings.TrimSuffix(im, ":ok")
		if parts := strings.Split(wh, "x"); len(parts) == 2 {
			w, _ = strconv.Atoi(parts[0])
			h, _ = strconv.Atoi(parts[1])
		}
		if !strings.HasSuffix(im, ":ok") || w < 100 || h < 100 {
			t.Errorf("image %d (%s) did not load: %s", i, r.Figures[i].MIME, im)
		}
	}
	for _, want := range []string{"Warnings", "Parameters", "Conventions", "Diagnostics", "Output files"} {
		if !strings.Contains(dom, ">"+want+"</h2>") {
			t.Errorf("rendered DOM lacks heading %q", want)
		}
	}

	// Screenshot of the report as written.
	rp := filepath.Join(dir, "report.html")
	if err := r.WriteFile(rp); err != nil {
		t.Fatal(err)
	}
	shot := filepath.Join(dir, "shot.png")
	runChromium(t, bin, rp, "--screenshot="+shot, "--window-size=1000,1400", "--virtual-time-budget=10000")
	f, err := os.Open(shot)
	if err != nil {
		t.Fatalf("no screenshot: %v", err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	// Count pixels in the colours of the map's scale ends: strongly blue
	// (b > r + 60) for low flux and strongly orange (r > b + 60). A page
	// whose figures did not show has none of either.
	blue, orange := 0, 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, _, bb, _ := img.At(x, y).RGBA()
			r8, b8 := int(r>>8), int(bb>>8)
			switch {
			case b8 > r8+60:
				blue++
			case r8 > b8+60:
				orange++
			}
		}
	}
	if blue < 500 || orange < 50 {
		t.Errorf("screenshot shows %d blue and %d orange samples: figures not visible", blue, orange)
	}
}
