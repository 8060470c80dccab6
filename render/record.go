package render

import (
	"errors"
	"fmt"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// MaxRecordedTicks bounds the ticks RecordDrive keeps (HorizonS/TickS + 1):
// a page carries every tick, so a longer drive needs a coarser tick.
const MaxRecordedTicks = 200001

// TickFrame is the drive at one tick, as the timeline saw it.
type TickFrame struct {
	// TS is the tick's time, k·tick seconds.
	TS float64
	// User is the user's position, [lon, lat] degrees.
	User orb.Point
	// HeadingDeg, PitchDeg and Zoom are the camera's (degrees clockwise from
	// north; degrees from straight down; zoom level).
	HeadingDeg, PitchDeg, Zoom float64
	// Footprint is the view's footprint (SPEC §2).
	Footprint viewport.Footprint
	// UserMercator is the user's Mercator point, metres.
	UserMercator viewport.Mercator
	// Shown holds the ids of the markers shown, in slot order.
	Shown []string
	// Visible holds the ids of the markers in view (SPEC §2), in marker
	// order: those shown and those crowded out by the cap.
	Visible []string
	// SpeedMps is the speed the rules were fed (the current segment's,
	// 0 at the route's end), m/s; Band the rule set's speed band then (an
	// index into the rules' bands).
	SpeedMps float64
	Band     int
}

// Recording is a drive recorded tick by tick: what RecordDrive saw through
// timeline.Drive.OnTick, and the timeline's answer.
type Recording struct {
	TickS, HorizonS float64
	Cap             int
	// Markers are the markers as given.
	Markers []timeline.Marker
	// Ticks holds ticks 0 … HorizonS/TickS.
	Ticks []TickFrame
	// Timeline is timeline.Compute's answer, one per marker in order.
	Timeline []timeline.Result
}

// Buckets returns each marker's bucket by id.
func (r *Recording) Buckets() map[string]timeline.Bucket {
	out := make(map[string]timeline.Bucket, len(r.Markers))
	for i, m := range r.Markers {
		out[m.ID] = r.Timeline[i].Bucket
	}
	return out
}

// RecordDrive runs timeline.Compute on d and markers and records every
// tick: the user's place, the camera's heading, zoom and pitch, the
// footprint and the ids of the markers shown. d is not changed (a copy gets
// the recording hook, which calls d.OnTick too when it is set). Errors are
// the timeline's, or a drive of more than MaxRecordedTicks ticks.
func RecordDrive(d *timeline.Drive, markers []timeline.Marker) (Recording, error) {
	if d == nil {
		return Recording{}, errors.New("render: no drive")
	}
	if err := d.Validate(); err != nil {
		return Recording{}, err
	}
	n := d.Ticks() + 1
	if n > MaxRecordedTicks {
		return Recording{}, fmt.Errorf("render: %d ticks (horizon_s %g / tick_s %g): a recording keeps at most %d; use a larger tick",
			n, d.HorizonS, d.TickS, MaxRecordedTicks)
	}
	rec := Recording{TickS: d.TickS, HorizonS: d.HorizonS, Cap: d.Cap, Markers: markers, Ticks: make([]TickFrame, 0, n)}
	run := *d
	outer, outerBand := d.OnTick, d.OnBand
	merc := make([]viewport.Mercator, len(markers))
	for i, m := range markers {
		merc[i] = viewport.ToMercator(m.Point)
	}
	// The speed the timeline feeds the rules: the current segment's, 0 at
	// the route's end (SPEC §5's motion).
	walk := d.Route.Walk(d.StartAlongM)
	lengthM := d.Route.LengthM()
	run.OnTick = func(k int, v *viewport.View, shown []int) {
		cam := v.Camera()
		ids := make([]string, len(shown))
		for j, i := range shown {
			ids[j] = markers[i].ID
		}
		var vis []string
		for i := range markers {
			if v.InView(merc[i]) {
				vis = append(vis, markers[i].ID)
			}
		}
		t := float64(k) * d.TickS
		along := walk.AlongAfterS(t)
		speed := d.Route.Segment(walk.SegmentAt(along)).SpeedMps
		if along >= lengthM {
			speed = 0
		}
		rec.Ticks = append(rec.Ticks, TickFrame{
			TS: t, User: cam.User(),
			HeadingDeg: cam.HeadingDeg, PitchDeg: cam.PitchDeg, Zoom: cam.Zoom,
			Footprint: v.Footprint(), UserMercator: v.UserMercator(), Shown: ids, Visible: vis, SpeedMps: speed,
		})
		if outer != nil {
			outer(k, v, shown)
		}
	}
	run.OnBand = func(k, band int) {
		rec.Ticks[k].Band = band
		if outerBand != nil {
			outerBand(k, band)
		}
	}
	res, err := timeline.Compute(&run, markers)
	if err != nil {
		return Recording{}, err
	}
	rec.Timeline = res
	return rec, nil
}
