package render_test

import (
	"context"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/viewport"
)

// screenMark is a marker of the page's screen view as the browser shows it.
type screenMark struct {
	ID        string `json:"id"`
	State     string `json:"state"`
	Shown     bool   `json:"shown"`
	Transform string `json:"transform"`
}

// readScreen is the script that reads the screen view's markers.
const readScreen = `Array.prototype.map.call(document.querySelectorAll("#screen-markers .smarker"), function (e) {
  return { id: e.getAttribute("data-id"), state: e.getAttribute("data-state"), shown: e.classList.contains("shown"),
           transform: e.getAttribute("transform") };
})`

// In a real browser, moving the slider redraws the screen view: at each
// tick checked, the markers drawn in view are exactly those the recording
// has in view, the haloed ones exactly those the timeline shows, and each
// marker within the screen is drawn at the pixel the reference projects it
// to from the tick's camera (to the page's 0.01 of a unit), in the state
// the reference's answer gives it. The play button moves the slider.
func TestRenderDriveScreenInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	exe := chromium(t)
	d := demoDrive(t, phoneRules())
	ms := demoMarkers()
	page, err := render.DriveHTML(&d, ms, render.WithStreets([]render.Street{{Name: "Harbour Road", Points: demoRoutePoints()}}),
		render.WithNames(map[string]string{"bakery": "Saltmarsh Bakery"}))
	if err != nil {
		t.Fatal(err)
	}
	rec, err := render.RecordDrive(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	sf := readScreenFrame(t, parseXML(t, page).byID(t, "screen-view"))
	dir := t.TempDir()
	path := filepath.Join(dir, "drive.html")
	if err := os.WriteFile(path, page, 0o644); err != nil {
		t.Fatal(err)
	}
	alloc, cancelAlloc := chromedp.NewExecAllocator(context.Background(),
		chromedp.ExecPath(exe), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU, chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck, chromedp.UserDataDir(filepath.Join(dir, "profile")),
		chromedp.Flag("disable-dev-shm-usage", true), chromedp.Flag("host-resolver-rules", "MAP * ~NOTFOUND"))
	defer cancelAlloc()
	ctx, cancelCtx := chromedp.NewContext(alloc)
	defer cancelCtx()
	ctx, cancel := context.WithTimeout(ctx, 2*time.Minute)
	defer cancel()
	var exceptions []string
	if err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*runtime.EventExceptionThrown); ok {
			exceptions = append(exceptions, (&chromedp.ExceptionError{ExceptionDetails: e.ExceptionDetails}).Error())
		}
	}); err != nil {
		t.Fatalf("starting %s: %v", exe, err)
	}
	if err := chromedp.Do(ctx, chromedp.Navigate("file://"+filepath.ToSlash(path)), chromedp.WaitReady(chromedp.ID("time"))); err != nil {
		t.Fatalf("loading the page in %s: %v", exe, err)
	}

	// Ticks where the shown markers change, and a spread over the drive.
	ticks := []int{0}
	for k := 1; k < len(rec.Ticks) && len(ticks) < 6; k++ {
		if !slices.Equal(rec.Ticks[k].Shown, rec.Ticks[k-1].Shown) {
			ticks = append(ticks, k)
		}
	}
	last := len(rec.Ticks) - 1
	ticks = append(ticks, last/3, last/2, last)
	shownSeen := 0
	for _, k := range ticks {
		tk := rec.Ticks[k]
		got, err := chromedp.Run(ctx, chromedp.Evaluate[[]screenMark](`(function () {
  var s = document.getElementById("time");
  s.value = "`+strconv.Itoa(k)+`";
  s.dispatchEvent(new Event("input", { bubbles: true }));
  return `+readScreen+`;
})()`))
		if err != nil {
			t.Fatalf("tick %d: %v", k, err)
		}
		v, err := viewport.Prepare(viewport.Camera{LatDeg: tk.User[1], LonDeg: tk.User[0], HeadingDeg: tk.HeadingDeg,
			PitchDeg: tk.PitchDeg, Zoom: tk.Zoom, Device: d.Device})
		if err != nil {
			t.Fatal(err)
		}
		var inView, shown []string
		drawn := map[string]screenMark{}
		for _, g := range got {
			drawn[g.ID] = g
			if g.State == "in-view" {
				inView = append(inView, g.ID)
			}
			if g.Shown {
				shown = append(shown, g.ID)
			}
		}
		slices.Sort(inView)
		slices.Sort(shown)
		if want := slices.Sorted(slices.Values(tk.Visible)); !slices.Equal(inView, want) {
			t.Errorf("tick %d: the screen draws %v in view, the recording has %v", k, inView, want)
		}
		if want := slices.Sorted(slices.Values(tk.Shown)); !slices.Equal(shown, want) {
			t.Errorf("tick %d: the screen haloes %v, the timeline shows %v", k, shown, want)
		}
		shownSeen += len(shown)
		for _, m := range ms {
			sp := v.Project(m.Point)
			if !sp.HasPixel() || sp.X < 0 || sp.X > sf.w || sp.Y < 0 || sp.Y > sf.h {
				continue // off the screen: pinned or not drawn
			}
			g, ok := drawn[m.ID]
			if !ok {
				t.Errorf("tick %d: marker %q at pixel (%.2f, %.2f) is not drawn", k, m.ID, sp.X, sp.Y)
				continue
			}
			if st := wantState(&v, sp); g.State != st {
				t.Errorf("tick %d: marker %q drawn %s, the reference says %s", k, m.ID, g.State, st)
			}
			if err := closePoints([][2]float64{translateOf(t, g.Transform)}, [][2]float64{sf.at(sp.X, sp.Y)}, 0.005+1e-9); err != nil {
				t.Errorf("tick %d: marker %q: %v", k, m.ID, err)
			}
		}
	}
	if shownSeen == 0 {
		t.Error("no tick checked shows a marker: the test proves little")
	}

	// Play advances the slider; a second press pauses it.
	before, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(function () {
  var s = document.getElementById("time");
  s.value = "0";
  s.dispatchEvent(new Event("input"));
  document.getElementById("play").click();
  return s.value;
})()`))
	if err != nil {
		t.Fatal(err)
	}
	time.Sleep(1200 * time.Millisecond)
	after, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(function () {
  document.getElementById("play").click();
  return document.getElementById("time").value;
})()`))
	if err != nil {
		t.Fatal(err)
	}
	if a, _ := strconv.Atoi(after); a < 2 || before != "0" {
		t.Errorf("after playing for 1.2 s the slider went from %q to %q, want at least 2 ticks on", before, after)
	}
	if len(exceptions) > 0 {
		t.Errorf("script exceptions: %s", strings.Join(exceptions, "; "))
	}
}
