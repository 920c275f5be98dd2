package main

import (
	"bytes"
	"context"
	"image"
	"image/png"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/spade-detect/spade/internal/report"
)

// reportHost is the made-up host the browser is sent to; the test's proxy
// serves the report's folder under it and records every other request.
const reportHost = "report.spade.test"

// TestSeasonReport runs `spade evaluate --report` on the demo history (40
// trees, a fixed date), compares the page and its pictures with the golden
// files in testdata/golden/report/, and opens the page in a real browser.
func TestSeasonReport(t *testing.T) {
	_, _, history, _, values := demoModel(t)
	t.Setenv("SOURCE_DATE_EPOCH", "1764806400") // 2025-12-04: the page's date, fixed for the golden file
	dir := filepath.Join(t.TempDir(), "season")
	_, stderr, code := spade(t, "", "evaluate", history, "--values", values, "--trees", "40", "--report", dir, "-o", os.DevNull)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	t.Run("golden", func(t *testing.T) { reportGolden(t, dir) })
	t.Run("browser", func(t *testing.T) { reportInBrowser(t, dir) })
}

// versionPattern is spade's version on the page, which a golden file
// cannot hold (the commit changes).
var versionPattern = regexp.MustCompile(`spade [0-9][^ <]* \(commit [^)]*\)`)

func reportGolden(t *testing.T, dir string) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	want := report.Files()
	slices.Sort(want)
	if !slices.Equal(names, want) {
		t.Errorf("the report's folder holds %v, want %v", names, want)
	}
	goldenReport := filepath.Join(goldenDir, "report")
	for _, name := range names {
		got, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		if name == report.PageFile {
			got = versionPattern.ReplaceAll(got, []byte("spade VERSION"))
		}
		path := filepath.Join(goldenReport, name)
		if *update {
			if err := os.MkdirAll(goldenReport, 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test ./cmd/spade -update)", err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("report/%s differs from the golden file; if the change is right, run go test ./cmd/spade -update and look at the pictures", name)
		}
	}
}

// browserPath finds Chromium: SPADE_BROWSER, else chromium on the PATH.
// Without one the browser test is skipped, unless SPADE_REQUIRE_BROWSER
// is set (.ci/run installs Debian's chromium and sets it).
func browserPath(t *testing.T) string {
	if p := os.Getenv("SPADE_BROWSER"); p != "" {
		return p
	}
	if p, err := exec.LookPath("chromium"); err == nil {
		return p
	}
	if os.Getenv("SPADE_REQUIRE_BROWSER") != "" {
		t.Fatal("no chromium on the PATH and no SPADE_BROWSER, but SPADE_REQUIRE_BROWSER is set")
	}
	t.Skip("no chromium on the PATH (apt-get install chromium, or set SPADE_BROWSER); .ci/run installs it")
	return ""
}

// requestLog is what the test's proxy saw.
type requestLog struct {
	mu      sync.Mutex
	served  []string // paths of the report served
	missing []string // paths of the report asked for and not in its folder
	outside []string // requests the page made beyond its folder
	other   []string // the browser's own requests, not the page's
}

func (l *requestLog) add(list *[]string, s string) {
	l.mu.Lock()
	defer l.mu.Unlock()
	*list = append(*list, s)
}

// reportInBrowser opens the report in headless Chromium through a proxy
// that serves the folder under reportHost and answers nothing else, and
// takes a screenshot. It fails when the page is blank, when a picture it
// shows cannot be loaded from its folder, or when the page asks for
// anything beyond its folder (the network).
func reportInBrowser(t *testing.T, dir string) {
	browser := browserPath(t)
	var log requestLog
	files := http.FileServer(http.Dir(dir))
	proxy := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		fromPage := strings.Contains(r.Referer(), reportHost)
		if r.Method == http.MethodConnect || r.Host != reportHost {
			what := r.Method + " " + r.Host + r.URL.Path
			if fromPage {
				log.add(&log.outside, what)
			} else {
				log.add(&log.other, what)
			}
			http.Error(w, "the page needs nothing beyond its folder", http.StatusBadGateway)
			return
		}
		if _, err := os.Stat(filepath.Join(dir, filepath.FromSlash(r.URL.Path))); err != nil {
			if r.URL.Path == "/favicon.ico" {
				// Every browser asks a site for its icon; the page names none.
				log.add(&log.other, "GET "+r.URL.Path)
			} else {
				log.add(&log.missing, r.URL.Path)
			}
		} else {
			log.add(&log.served, r.URL.Path)
		}
		files.ServeHTTP(w, r)
	}))
	defer proxy.Close()
	shot := filepath.Join(t.TempDir(), "report.png")
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	// Flags as this machine's notes give them for a closed network, and a
	// proxy for everything: nothing leaves the test.
	cmd := exec.CommandContext(ctx, browser, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--disable-default-apps",
		"--user-data-dir="+t.TempDir(), "--proxy-server="+proxy.URL, "--hide-scrollbars",
		"--force-device-scale-factor=0.5", "--window-size=1100,9000", "--screenshot="+shot,
		"http://"+reportHost+"/"+report.PageFile)
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%s: %v\n%s", browser, err, out)
	}
	if len(log.other) > 0 {
		t.Logf("the browser's own requests (not the page's): %v", log.other)
	}
	if len(log.outside) > 0 {
		t.Errorf("the page asked for what is not in its folder: %v", log.outside)
	}
	if len(log.missing) > 0 {
		t.Errorf("the page asked for files its folder lacks: %v", log.missing)
	}
	for _, name := range report.Files() {
		if !slices.Contains(log.served, "/"+name) {
			t.Errorf("the browser never loaded %s; it loaded %v", name, log.served)
		}
	}
	data, err := os.ReadFile(shot)
	if err != nil {
		t.Fatalf("no screenshot: %v\n%s", err, out)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	ink, colour := pageInk(img)
	// A blank or broken page is nearly all white; the report has text on
	// every line and coloured pictures (thresholds ours, a fifth of what
	// the demo's report shows).
	if ink < 0.03 || colour < 0.005 {
		t.Errorf("the page looks blank: %.1f%% of pixels inked, %.2f%% coloured", 100*ink, 100*colour)
	}
	golden := filepath.Join(goldenDir, "report-demo.png")
	if *update {
		if err := os.WriteFile(golden, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	// The golden screenshot is for the README and for review; fonts differ
	// between machines, so only its size is held to: the page's layout.
	f, err := os.Open(golden)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/spade -update)", err)
	}
	defer f.Close()
	want, err := png.DecodeConfig(f)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != want.Width || b.Dy() != want.Height {
		t.Errorf("screenshot %dx%d, golden %dx%d", b.Dx(), b.Dy(), want.Width, want.Height)
	}
}

// pageInk is the share of pixels that are not near white, and of those
// that are clearly coloured (channels far apart), in a screenshot.
func pageInk(img image.Image) (ink, colour float64) {
	b := img.Bounds()
	var inked, coloured, all int
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			r, g, bl = r>>8, g>>8, bl>>8
			all++
			if min(r, g, bl) < 200 {
				inked++
			}
			if max(r, g, bl)-min(r, g, bl) > 80 {
				coloured++
			}
		}
	}
	return float64(inked) / float64(all), float64(coloured) / float64(all)
}
