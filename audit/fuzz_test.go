package audit_test

import (
	"errors"
	"testing"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/spec"
)

// FuzzDecodeRecord: any line decodes to a record or to an error naming a
// field (or a JSON error), never a panic; a small record decoded is
// audited without a panic, and its outcomes match its candidates.
func FuzzDecodeRecord(f *testing.F) {
	s := demo.Default()
	sets := demoSets(s)
	f.Add([]byte(`{"request_id":"r","device":{"width_px":390,"height_px":844,"fov_y_deg":45},"rules_ref":"phone",` +
		`"trace":[{"t_s":0,"lat":0,"lon":0},{"t_s":1,"lat":0.0001,"lon":0}],"candidates":[{"id":"a","lat":0.001,"lon":0}],` +
		`"shown":[{"id":"a","first_shown_s":0,"shown_s":1,"intervals_s":[[0,1]]}],"predicted":[{"id":"a","p":[0.25,0.25,0.25,0.25]}]}`))
	f.Add([]byte(`{"request_id":"r","trace":[{"t_s":2,"lat":0,"lon":0},{"t_s":1,"lat":0,"lon":1}]}`))
	f.Fuzz(func(t *testing.T, line []byte) {
		rec, err := audit.DecodeRecord(line, sets)
		if err != nil {
			var fe *spec.FieldError
			if errors.As(err, &fe) && fe.Field == "" {
				t.Fatalf("a field error naming no field: %v", err)
			}
			return
		}
		if len(rec.Candidates) > 50 || rec.Drive.Ticks() > 2000 || len(rec.Fixes) > 200 {
			return
		}
		res, err := audit.Audit(rec)
		if err != nil {
			return
		}
		if len(res.Outcomes) != len(rec.Candidates) {
			t.Fatalf("%d outcomes for %d candidates", len(res.Outcomes), len(rec.Candidates))
		}
	})
}
