package audit

import (
	"encoding/json"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// ReplayRequest returns rec's drive as a timeline request along its fixes
// (SPEC §5, §9): the reference answers it with the timeline the audit
// judged the record by, so a finding's example can be replayed through
// `viewspec eval` or any implementation.
func ReplayRequest(rec *Record) *wire.Request {
	d := &rec.Drive
	id, _ := json.Marshal(rec.RequestID)
	horizon, tick, capN := d.HorizonS, d.TickS, float64(d.Cap)
	e1, e2 := d.BucketEdgesS[0], d.BucketEdgesS[1]
	req := &wire.Request{Op: "timeline", ID: id,
		Device: wire.CameraOf(viewport.Camera{Device: d.Device}).Device, Rules: wire.RulesOf(d.Rules),
		HorizonS: &horizon, TickS: &tick, Cap: &capN, BucketEdgesS: []*float64{&e1, &e2}}
	req.Fixes = make([]*wire.Fix, len(rec.Fixes))
	for i := range rec.Fixes {
		f := &rec.Fixes[i]
		req.Fixes[i] = &wire.Fix{TS: &f.TS, Lat: &f.Point[1], Lon: &f.Point[0]}
	}
	req.Markers = markersOf(rec.Candidates)
	return req
}

// ReplayLine is ReplayRequest as one JSON line (without the newline).
func ReplayLine(rec *Record) string {
	b, err := json.Marshal(ReplayRequest(rec))
	if err != nil {
		return "" // every number came from a valid record: finite
	}
	return string(b)
}

func markersOf(ms []timeline.Marker) []*wire.Marker {
	out := make([]*wire.Marker, len(ms))
	for i := range ms {
		m := &ms[i]
		out[i] = &wire.Marker{ID: &m.ID, Lat: &m.Point[1], Lon: &m.Point[0], Priority: &m.Priority}
	}
	return out
}
