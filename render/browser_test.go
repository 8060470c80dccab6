package render_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"github.com/viewspec/viewspec/internal/testtool"
	"github.com/viewspec/viewspec/render"
)

// chromium returns the path of Debian's Chromium (package chromium), or
// skips (fails under CI=true) when it is missing.
func chromium(t *testing.T) string {
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return testtool.Need(t, "chromium", "chromium")
}

// browserState is what the page shows after the slider moved.
type browserState struct {
	Points string   `json:"points"`
	Class  string   `json:"class"`
	Count  string   `json:"count"`
	Time   string   `json:"time"`
	User   string   `json:"user"`
	Lit    []string `json:"lit"`
	Rows   []string `json:"rows"`
	Slider string   `json:"slider"`
}

// readState is the script that reads browserState.
const readState = `({
  points: document.getElementById("footprint").getAttribute("points"),
  class: document.getElementById("footprint").getAttribute("class"),
  count: document.getElementById("shown-count").textContent,
  time: document.getElementById("time-s").textContent,
  user: document.getElementById("user").getAttribute("transform"),
  lit: Array.prototype.map.call(document.querySelectorAll("#drive-map .marker.shown"), function (e) { return e.getAttribute("data-id"); }),
  rows: Array.prototype.map.call(document.querySelectorAll("#markers-table tr.shown"), function (e) { return e.getAttribute("data-id"); }),
  slider: document.getElementById("time").value
})`

// moveTo sets the slider to tick k, dispatches the input event a person's
// drag would, and reads the page back.
func moveTo(k int) string {
	return `(function () {
  var s = document.getElementById("time");
  s.value = "` + strconv.Itoa(k) + `";
  s.dispatchEvent(new Event("input", { bubbles: true }));
  return ` + readState + `;
})()`
}

// A real browser loads the page from a file:// URL with no network, and
// the slider moves the footprint, the user, the highlighted markers and
// the readouts to the recording's tick: the footprint's points are the
// reference's vertices mapped through the page's frame (within 1e-6 of a
// picture unit), #shown-count is the number of markers the timeline shows
// at that tick, #time-s its time. Nothing is fetched and no script fails.
func TestRenderDriveInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	exe := chromium(t)
	start := time.Now()

	d := demoDrive(t, phoneRules())
	ms := demoMarkers()
	page, err := render.DriveHTML(&d, ms, render.WithRulesName("phone.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	rec, err := render.RecordDrive(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	f := readFrame(t, parseXML(t, page).byID(t, "drive-map"))
	dir := t.TempDir()
	path := filepath.Join(dir, "drive.html")
	if err := os.WriteFile(path, page, 0o644); err != nil {
		t.Fatal(err)
	}
	url := "file://" + filepath.ToSlash(path)

	alloc, cancelAlloc := chromedp.NewExecAllocator(context.Background(),
		chromedp.ExecPath(exe),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.UserDataDir(filepath.Join(dir, "profile")),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-default-apps", true),
		chromedp.Flag("disable-extensions", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		// No network: every host name fails to resolve.
		chromedp.Flag("host-resolver-rules", "MAP * ~NOTFOUND"),
	)
	defer cancelAlloc()
	ctx, cancelCtx := chromedp.NewContext(alloc)
	defer cancelCtx()
	ctx, cancel := context.WithTimeout(ctx, 2*time.Minute)
	defer cancel()

	var mu sync.Mutex
	var problems []string
	note := func(format string, args ...any) {
		mu.Lock()
		problems = append(problems, fmt.Sprintf(format, args...))
		mu.Unlock()
	}
	if err := chromedp.Listen(ctx, func(ev any) {
		switch e := ev.(type) {
		case *network.EventRequestWillBeSent:
			if !strings.HasPrefix(e.Request.URL, "file://") {
				note("the page requested %s", e.Request.URL)
			}
		case *runtime.EventExceptionThrown:
			note("script exception: %s", (&chromedp.ExceptionError{ExceptionDetails: e.ExceptionDetails}).Error())
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.ConsoleAPICalledTypeError {
				note("console error: %v", e.Args)
			}
		case *cdplog.EventEntryAdded:
			if e.Entry.Level == cdplog.EntryLevelError {
				note("browser log error: %s (%s)", e.Entry.Text, e.Entry.URL)
			}
		}
	}); err != nil {
		t.Fatalf("starting %s: %v", exe, err)
	}
	if err := chromedp.Do(ctx, chromedp.Navigate(url), chromedp.WaitReady(chromedp.ID("time"))); err != nil {
		t.Fatalf("loading %s: %v", url, err)
	}
	t.Logf("%s started and loaded the page in %v", exe, time.Since(start).Round(time.Millisecond))

	// check compares the page with the recording at tick k.
	check := func(k int, st browserState) {
		t.Helper()
		tk := rec.Ticks[k]
		if st.Slider != strconv.Itoa(k) {
			t.Errorf("tick %d: slider reads %q", k, st.Slider)
		}
		if want := strconv.Itoa(len(tk.Shown)); st.Count != want {
			t.Errorf("tick %d: #shown-count = %q, want %s", k, st.Count, want)
		}
		if ts, err := strconv.ParseFloat(st.Time, 64); err != nil || math.Abs(ts-tk.TS) > 0.005 || !strings.Contains(st.Time, ".") || len(st.Time)-strings.Index(st.Time, ".") != 3 {
			t.Errorf("tick %d: #time-s = %q, want %.2f (two decimals)", k, st.Time, tk.TS)
		}
		if tk.Footprint.Empty {
			if st.Points != "" || st.Class != "empty" {
				t.Errorf("tick %d: empty footprint shown as points %q class %q", k, st.Points, st.Class)
			}
		} else {
			var want [][2]float64
			for _, m := range tk.Footprint.Mercator {
				want = append(want, f.apply(m))
			}
			if err := closePoints(parsePoints(t, st.Points), want, unitTol); err != nil {
				t.Errorf("tick %d: footprint points %q: %v", k, st.Points, err)
			}
		}
		u := translateOf(t, st.User)
		if err := closePoints([][2]float64{u}, [][2]float64{f.apply(tk.UserMercator)}, unitTol); err != nil {
			t.Errorf("tick %d: user: %v", k, err)
		}
		want := slices.Sorted(slices.Values(tk.Shown))
		if got := slices.Sorted(slices.Values(st.Lit)); !slices.Equal(got, want) {
			t.Errorf("tick %d: map highlights %v, the timeline shows %v", k, got, want)
		}
		if got := slices.Sorted(slices.Values(st.Rows)); !slices.Equal(got, want) {
			t.Errorf("tick %d: table highlights %v, the timeline shows %v", k, got, want)
		}
	}

	// As loaded: tick 0.
	st0, err := chromedp.Run(ctx, chromedp.Evaluate[browserState](readState))
	if err != nil {
		t.Fatal(err)
	}
	check(0, st0)

	// Ticks around the first change of the shown count, a change of shown
	// ids, the middle, the end, and back to the start.
	ticks := []int{}
	for k := 1; k < len(rec.Ticks); k++ {
		if len(rec.Ticks[k].Shown) != len(rec.Ticks[k-1].Shown) {
			ticks = append(ticks, k-1, k)
			break
		}
	}
	for k := 1; k < len(rec.Ticks); k++ {
		if !slices.Equal(rec.Ticks[k].Shown, rec.Ticks[k-1].Shown) && !slices.Contains(ticks, k) {
			ticks = append(ticks, k)
			break
		}
	}
	if len(ticks) < 3 {
		t.Fatalf("the demo drive's shown markers hardly change (ticks %v): the test would prove little", ticks)
	}
	last := len(rec.Ticks) - 1
	ticks = append(ticks, last/2, last/2+1, last, 0)
	prev := st0
	counts := map[string]bool{}
	for _, k := range ticks {
		st, err := chromedp.Run(ctx, chromedp.Evaluate[browserState](moveTo(k)))
		if err != nil {
			t.Fatalf("tick %d: %v", k, err)
		}
		check(k, st)
		if k != 0 && st.Points == prev.Points {
			t.Errorf("tick %d: the footprint did not move (points %q)", k, st.Points)
		}
		counts[st.Count] = true
		prev = st
	}
	if len(counts) < 2 {
		t.Errorf("#shown-count took only the values %v over ticks %v", counts, ticks)
	}

	mu.Lock()
	defer mu.Unlock()
	for _, p := range problems {
		t.Error(p)
	}
	t.Logf("ticks %v checked in %v in all", ticks, time.Since(start).Round(time.Millisecond))
}
