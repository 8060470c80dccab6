// Package gate shows what a change of zoom rules does to visibility before
// it ships: it drives every drive of a set under a base rule set and a new
// one (SPEC §5) and reports, per drive and in total, which markers move
// between buckets, the shown seconds gained and lost, the footprint's
// area-seconds, the zoom and pitch ranges and how often the speed band
// changes; and it evaluates gate conditions on those measures.
//
// Times are seconds, areas square metres (area-seconds m²·s), zoom in zoom
// levels, pitch in degrees. Buckets are early, mid, late and never.
package gate

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Trip is one drive to compare the rule sets on: a name, its route with
// speeds, and where it starts.
type Trip struct {
	Name        string
	Route       *routes.Route
	StartAlongM float64
}

// ReadTrips reads drive files: route files (GeoJSON with
// properties.speed_mps, or GPX 1.1 with times; SPEC §4), named by their
// properties.name or their file name. A folder stands for its *.geojson,
// *.json and *.gpx files, in name order.
func ReadTrips(paths []string) ([]Trip, error) {
	var files []string
	for _, p := range paths {
		st, err := os.Stat(p)
		if err != nil {
			return nil, err
		}
		if !st.IsDir() {
			files = append(files, p)
			continue
		}
		entries, err := os.ReadDir(p)
		if err != nil {
			return nil, err
		}
		var in []string
		for _, e := range entries {
			switch strings.ToLower(filepath.Ext(e.Name())) {
			case ".geojson", ".json", ".gpx":
				in = append(in, filepath.Join(p, e.Name()))
			}
		}
		if len(in) == 0 {
			return nil, fmt.Errorf("%s: no drive files (*.geojson, *.json, *.gpx)", p)
		}
		slices.Sort(in)
		files = append(files, in...)
	}
	drives := make([]Trip, 0, len(files))
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			return nil, err
		}
		rf, err := geofile.ReadRoute(f, data)
		if err != nil {
			return nil, err
		}
		if rf.SpeedsMps == nil {
			return nil, fmt.Errorf("%s: a drive needs speeds (properties.speed_mps, or GPX times)", f)
		}
		r, err := routes.New(rf.Points, rf.SpeedsMps)
		if err != nil {
			return nil, fmt.Errorf("%s: %v", f, err)
		}
		name := strings.TrimSuffix(filepath.Base(f), filepath.Ext(f))
		drives = append(drives, Trip{Name: name, Route: r})
	}
	return drives, nil
}

// Buckets lists the buckets in report order.
var Buckets = []timeline.Bucket{timeline.Early, timeline.Mid, timeline.Late, timeline.Never}

// Trace is what one rule set did on one drive, tick by tick.
type Trace struct {
	TimesS   []float64
	Zoom     []float64
	PitchDeg []float64
	Band     []int
}

// Outcome is one drive under one rule set.
type Outcome struct {
	Markers []timeline.Result
	Trace   Trace
	// AreaS is the footprint's area integrated over the drive, m²·s.
	AreaS float64
}

// TripDiff compares one drive under the two rule sets.
type TripDiff struct {
	Name string `json:"name"`
	Measures
	// Moves[from][to] counts markers by their bucket under the base rules
	// (from) and the new rules (to), in the order early, mid, late, never.
	Moves     [4][4]int `json:"moves"`
	Base, New Outcome   `json:"-"`
	drives    int       // drives folded in (the total)
}

// Measures are the numbers a gate condition can name.
type Measures struct {
	Markers         int     `json:"markers"`
	ShownSBase      float64 `json:"shown_s_base"`
	ShownSNew       float64 `json:"shown_s_new"`
	GainedShownS    float64 `json:"gained_shown_s"`
	LostShownS      float64 `json:"lost_shown_s"`
	GainedShownPct  float64 `json:"gained_shown_pct"`
	LostShownPct    float64 `json:"lost_shown_pct"`
	Moved           int     `json:"moved"`
	NeverAdded      int     `json:"never_added"`
	NeverRemoved    int     `json:"never_removed"`
	EarlyLost       int     `json:"early_lost"`
	EarlyAdded      int     `json:"early_added"`
	AreaSBase       float64 `json:"area_s_base"`
	AreaSNew        float64 `json:"area_s_new"`
	AreaChangePct   float64 `json:"area_change_pct"`
	BandChangesBase int     `json:"band_changes_base"`
	BandChangesNew  int     `json:"band_changes_new"`
	ZoomMinBase     float64 `json:"zoom_min_base"`
	ZoomMaxBase     float64 `json:"zoom_max_base"`
	ZoomMinNew      float64 `json:"zoom_min_new"`
	ZoomMaxNew      float64 `json:"zoom_max_new"`
	PitchMinBase    float64 `json:"pitch_min_base"`
	PitchMaxBase    float64 `json:"pitch_max_base"`
	PitchMinNew     float64 `json:"pitch_min_new"`
	PitchMaxNew     float64 `json:"pitch_max_new"`
}

// Comparison is the whole comparison.
type Comparison struct {
	Drives []TripDiff `json:"drives"`
	Total  TripDiff   `json:"total"`
}

// Setup are the drives' common inputs.
type Setup struct {
	Device  viewport.Device
	Markers []timeline.Marker
	// Configure, when set, adjusts each drive before it runs (horizon,
	// tick, cap, bucket edges).
	Configure func(d *timeline.Drive)
}

// runDrive drives dr under rs and records the trace.
func runDrive(dr Trip, rs *rules.Set, opt *Setup) (Outcome, error) {
	d := timeline.NewDrive(dr.Route, dr.StartAlongM, opt.Device, rs)
	if opt.Configure != nil {
		opt.Configure(&d)
	}
	var run Outcome
	n := d.Ticks() + 1
	run.Trace = Trace{TimesS: make([]float64, 0, n), Zoom: make([]float64, 0, n), PitchDeg: make([]float64, 0, n), Band: make([]int, 0, n)}
	d.OnTick = func(k int, v *viewport.View, _ []int) {
		c := v.Camera()
		run.Trace.TimesS = append(run.Trace.TimesS, float64(k)*d.TickS)
		run.Trace.Zoom = append(run.Trace.Zoom, c.Zoom)
		run.Trace.PitchDeg = append(run.Trace.PitchDeg, c.PitchDeg)
		run.AreaS += v.Footprint().AreaM2 * d.TickS
	}
	d.OnBand = func(_, band int) { run.Trace.Band = append(run.Trace.Band, band) }
	ms, err := timeline.Compute(&d, opt.Markers)
	if err != nil {
		return run, fmt.Errorf("drive %s: %w", dr.Name, err)
	}
	run.Markers = ms
	return run, nil
}

func bucketIndex(b timeline.Bucket) int { return slices.Index(Buckets, b) }

// CompareRules drives every drive under base and next and compares them.
func CompareRules(drives []Trip, base, next *rules.Set, opt Setup) (*Comparison, error) {
	rep := &Comparison{Total: TripDiff{Name: "total"}}
	for _, dr := range drives {
		b, err := runDrive(dr, base, &opt)
		if err != nil {
			return nil, err
		}
		n, err := runDrive(dr, next, &opt)
		if err != nil {
			return nil, err
		}
		dd := TripDiff{Name: dr.Name, Base: b, New: n}
		dd.compare(opt.Markers)
		rep.Drives = append(rep.Drives, dd)
		rep.Total.add(&dd)
	}
	rep.Total.finish()
	return rep, nil
}

func (dd *TripDiff) compare(ms []timeline.Marker) {
	m := &dd.Measures
	m.Markers = len(ms)
	for i := range ms {
		b, n := dd.Base.Markers[i], dd.New.Markers[i]
		dd.Moves[bucketIndex(b.Bucket)][bucketIndex(n.Bucket)]++
		m.ShownSBase += b.ShownS
		m.ShownSNew += n.ShownS
		if d := n.ShownS - b.ShownS; d > 0 {
			m.GainedShownS += d
		} else {
			m.LostShownS -= d
		}
		if b.Bucket != n.Bucket {
			m.Moved++
		}
		switch {
		case b.Bucket != timeline.Never && n.Bucket == timeline.Never:
			m.NeverAdded++
		case b.Bucket == timeline.Never && n.Bucket != timeline.Never:
			m.NeverRemoved++
		}
		switch {
		case b.Bucket == timeline.Early && n.Bucket != timeline.Early:
			m.EarlyLost++
		case b.Bucket != timeline.Early && n.Bucket == timeline.Early:
			m.EarlyAdded++
		}
	}
	m.AreaSBase, m.AreaSNew = dd.Base.AreaS, dd.New.AreaS
	m.BandChangesBase, m.BandChangesNew = changes(dd.Base.Trace.Band), changes(dd.New.Trace.Band)
	m.ZoomMinBase, m.ZoomMaxBase = span(dd.Base.Trace.Zoom)
	m.ZoomMinNew, m.ZoomMaxNew = span(dd.New.Trace.Zoom)
	m.PitchMinBase, m.PitchMaxBase = span(dd.Base.Trace.PitchDeg)
	m.PitchMinNew, m.PitchMaxNew = span(dd.New.Trace.PitchDeg)
	dd.finish()
}

// add folds a drive into the total.
func (dd *TripDiff) add(o *TripDiff) {
	m, x := &dd.Measures, &o.Measures
	first := dd.drives == 0
	dd.drives++
	m.Markers += x.Markers
	m.ShownSBase += x.ShownSBase
	m.ShownSNew += x.ShownSNew
	m.GainedShownS += x.GainedShownS
	m.LostShownS += x.LostShownS
	m.Moved += x.Moved
	m.NeverAdded += x.NeverAdded
	m.NeverRemoved += x.NeverRemoved
	m.EarlyLost += x.EarlyLost
	m.EarlyAdded += x.EarlyAdded
	m.AreaSBase += x.AreaSBase
	m.AreaSNew += x.AreaSNew
	m.BandChangesBase += x.BandChangesBase
	m.BandChangesNew += x.BandChangesNew
	for i := range dd.Moves {
		for j := range dd.Moves[i] {
			dd.Moves[i][j] += o.Moves[i][j]
		}
	}
	if first {
		m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew = x.ZoomMinBase, x.ZoomMaxBase, x.ZoomMinNew, x.ZoomMaxNew
		m.PitchMinBase, m.PitchMaxBase, m.PitchMinNew, m.PitchMaxNew = x.PitchMinBase, x.PitchMaxBase, x.PitchMinNew, x.PitchMaxNew
		return
	}
	m.ZoomMinBase, m.ZoomMaxBase = min(m.ZoomMinBase, x.ZoomMinBase), max(m.ZoomMaxBase, x.ZoomMaxBase)
	m.ZoomMinNew, m.ZoomMaxNew = min(m.ZoomMinNew, x.ZoomMinNew), max(m.ZoomMaxNew, x.ZoomMaxNew)
	m.PitchMinBase, m.PitchMaxBase = min(m.PitchMinBase, x.PitchMinBase), max(m.PitchMaxBase, x.PitchMaxBase)
	m.PitchMinNew, m.PitchMaxNew = min(m.PitchMinNew, x.PitchMinNew), max(m.PitchMaxNew, x.PitchMaxNew)
}

// finish computes the percentages.
func (dd *TripDiff) finish() {
	m := &dd.Measures
	m.GainedShownPct = pct(m.GainedShownS, m.ShownSBase)
	m.LostShownPct = pct(m.LostShownS, m.ShownSBase)
	m.AreaChangePct = pct(m.AreaSNew-m.AreaSBase, m.AreaSBase)
}

func pct(part, whole float64) float64 {
	if whole == 0 {
		if part == 0 {
			return 0
		}
		return math.Copysign(100, part)
	}
	return 100 * part / whole
}

func changes(bands []int) int {
	n := 0
	for i := 1; i < len(bands); i++ {
		if bands[i] != bands[i-1] {
			n++
		}
	}
	return n
}

func span(xs []float64) (lo, hi float64) {
	if len(xs) == 0 {
		return 0, 0
	}
	return slices.Min(xs), slices.Max(xs)
}
