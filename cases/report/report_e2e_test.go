//go:build e2e

package report

// The browser half of the end-to-end check of the reports (.ci/e2e.sh):
// the script renders every report.html of the demo in headless Chromium and
// leaves, per page, a directory under $CURESLAB_E2E_DIR with
//
//	screenshot.png  the rendered page
//	stderr.log      Chromium's log with --enable-logging=stderr (console
//	                messages are the lines with ":INFO:CONSOLE")
//	netlog.json     Chromium's network log (--log-net-log)
//
// This test fails if a page logged anything to the console, started a
// network request, or rendered blank (one colour, or no map drawn). Two
// control pages that the script makes, control-bad (a script error and an
// external image) and control-blank (an empty page), must be caught, so a
// detector that stops working fails the check too.

import (
	"encoding/json"
	"image"
	"image/draw"
	"image/png"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

func TestE2EReportsInBrowser(t *testing.T) {
	root := os.Getenv("CURESLAB_E2E_DIR")
	if root == "" {
		t.Skip("CURESLAB_E2E_DIR is not set: run .ci/e2e.sh")
	}
	entries, err := os.ReadDir(root)
	if err != nil {
		t.Fatal(err)
	}
	pages := 0
	for _, e := range entries {
		if !e.IsDir() {
			continue
		}
		name, dir := e.Name(), filepath.Join(root, e.Name())
		console := consoleMessages(t, filepath.Join(dir, "stderr.log"))
		requests := pageRequests(t, filepath.Join(dir, "netlog.json"))
		// The comparison page overlays line plots and draws no map.
		blank, share := blankReason(t, filepath.Join(dir, "screenshot.png"), !strings.HasPrefix(name, "compare"))
		switch name {
		case "control-bad":
			if len(console) == 0 {
				t.Errorf("%s: the console detector missed the script error", name)
			}
			if len(requests) == 0 {
				t.Errorf("%s: the network detector missed the external image", name)
			}
		case "control-blank":
			if blank == "" {
				t.Errorf("%s: the blank-page detector passed an empty page", name)
			}
		default:
			pages++
			for _, m := range console {
				t.Errorf("%s: console: %s", name, m)
			}
			for _, u := range requests {
				t.Errorf("%s: the page loaded %s", name, u)
			}
			if blank != "" {
				t.Errorf("%s: %s", name, blank)
			}
			t.Logf("%s: %d console lines, %d requests, %.1f %% of the screenshot in map colours", name, len(console), len(requests), 100*share)
		}
	}
	if pages == 0 {
		t.Fatalf("no rendered report under %s", root)
	}
	t.Logf("%d report pages checked", pages)
}

// consoleMessages returns the console lines of a Chromium log.
func consoleMessages(t *testing.T, path string) []string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, line := range strings.Split(string(b), "\n") {
		if strings.Contains(line, ":INFO:CONSOLE") || strings.Contains(line, ":ERROR:CONSOLE") || strings.Contains(line, ":WARNING:CONSOLE") {
			out = append(out, strings.TrimSpace(line))
		}
	}
	return out
}

// pageRequests returns the URLs of the requests that the page (a frame whose
// network isolation key is file://) started for anything but file: and
// data: URLs. Chromium's own background requests have another key and are
// not the page's doing.
func pageRequests(t *testing.T, path string) []string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s := strings.TrimSpace(string(b))
	if !json.Valid([]byte(s)) {
		// Chromium stopped before it closed the array of events.
		s = strings.TrimSuffix(s, ",") + "]}"
	}
	var log struct {
		Constants struct {
			LogEventTypes map[string]int `json:"logEventTypes"`
		} `json:"constants"`
		Events []struct {
			Type   int            `json:"type"`
			Params map[string]any `json:"params"`
		} `json:"events"`
	}
	if err := json.Unmarshal([]byte(s), &log); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	start, ok := log.Constants.LogEventTypes["URL_REQUEST_START_JOB"]
	if !ok {
		t.Fatalf("%s: no URL_REQUEST_START_JOB event type in the net log", path)
	}
	var out []string
	for _, e := range log.Events {
		if e.Type != start {
			continue
		}
		url, _ := e.Params["url"].(string)
		nik, _ := e.Params["network_isolation_key"].(string)
		if !strings.HasPrefix(nik, "file://") {
			continue
		}
		if strings.HasPrefix(url, "file:") || strings.HasPrefix(url, "data:") {
			continue
		}
		out = append(out, url)
	}
	return out
}

// blankReason returns why a screenshot looks blank, or "", and the share of
// its pixels in map colours: it must have more than one colour; a page with
// maps must have at least 2 % of its pixels in colours of the blue or yellow
// part of the map palette (so the raster maps rendered, at their size), and
// a page without must have at least 1 % of its pixels inked (not near white).
func blankReason(t *testing.T, path string, wantMap bool) (string, float64) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	b := img.Bounds()
	rgb := image.NewRGBA(b)
	draw.Draw(rgb, b, img, b.Min, draw.Src)
	onMap := mapPaletteSet()
	first := [3]uint8{rgb.Pix[0], rgb.Pix[1], rgb.Pix[2]}
	single := true
	mapPixels, inked := 0, 0
	for i := 0; i+3 < len(rgb.Pix); i += 4 {
		r, g, bl := rgb.Pix[i], rgb.Pix[i+1], rgb.Pix[i+2]
		if min(r, g, bl) < 235 {
			inked++
		}
		if single && [3]uint8{r, g, bl} != first {
			single = false
		}
		k := uint32(r)<<16 | uint32(g)<<8 | uint32(bl)
		if onMap[k>>3]&(1<<(k&7)) != 0 {
			mapPixels++
		}
	}
	share := float64(mapPixels) / float64(b.Dx()*b.Dy())
	switch {
	case single:
		return "the screenshot is a single colour", share
	case !wantMap:
		if float64(inked) < 0.01*float64(b.Dx()*b.Dy()) {
			return "nearly blank: " + strconv.Itoa(inked) + " inked pixels", share
		}
	case share < 0.02:
		return "no map drawn: " + strconv.Itoa(mapPixels) + " of " + strconv.Itoa(b.Dx()*b.Dy()) + " pixels have map colours", share
	}
	return "", share
}

// mapPaletteSet returns a bit set over 24-bit RGB of the colours within 6
// per channel of a strongly coloured (blue or yellow, not grey) step of the
// cividis table.
func mapPaletteSet() []byte {
	set := make([]byte, 1<<21)
	for _, p := range cividis {
		pr, pg, pb := int(p>>16), int(p>>8&0xff), int(p&0xff)
		if max(pr, pg, pb)-min(pr, pg, pb) < 40 {
			continue
		}
		for r := max(pr-6, 0); r <= min(pr+6, 255); r++ {
			for g := max(pg-6, 0); g <= min(pg+6, 255); g++ {
				for bl := max(pb-6, 0); bl <= min(pb+6, 255); bl++ {
					k := r<<16 | g<<8 | bl
					set[k>>3] |= 1 << (k & 7)
				}
			}
		}
	}
	return set
}
