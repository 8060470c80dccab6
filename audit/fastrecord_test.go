package audit

import (
	"reflect"
	"testing"

	"github.com/viewspec/viewspec/demo"
)

// sameRecord holds the fast record reader to the general decoder: when
// the fast path takes a line, the general decoder reads the same record,
// and the record made of either is the same, or the same error.
func sameRecord(t *testing.T, line []byte, sets RuleSets) bool {
	t.Helper()
	var fast, gen wireRecord
	if !decodeRecordFast(line, &fast) {
		return false
	}
	if err := decodeRecordGeneral(line, &gen); err != nil {
		t.Fatalf("decodeRecordFast(%.300s) took a line the general decoder refuses: %v", line, err)
	}
	fr, ferr := fast.record(sets)
	gr, gerr := gen.record(sets)
	if (ferr == nil) != (gerr == nil) || ferr != nil && ferr.Error() != gerr.Error() {
		t.Fatalf("decodeRecordFast(%.300s): record error %v, the general decoder's %v", line, ferr, gerr)
	}
	if !reflect.DeepEqual(fr, gr) {
		t.Fatalf("decodeRecordFast(%.300s) = %+v, the general decoder's %+v", line, fr, gr)
	}
	return true
}

// fleetSets returns the demo town's rule sets by name.
func fleetSets(t testing.TB) RuleSets {
	sets := RuleSets{}
	for _, r := range demo.Default().RuleSets {
		sets[r.Name] = r.Set
	}
	return sets
}

// TestFastRecordOnDemoFleet: on the demo fleet's records the fast reader
// takes every line and reads what the general decoder reads.
func TestFastRecordOnDemoFleet(t *testing.T) {
	s := demo.Default()
	sets := fleetSets(t)
	for i := range 200 {
		line, err := s.FleetRecord(i)
		if err != nil {
			t.Fatal(err)
		}
		if !sameRecord(t, line, sets) {
			t.Fatalf("decodeRecordFast(record %d) declined a demo record: %.300s", i, line)
		}
	}
}

// FuzzFastRecord: whatever the line, the fast reader declines or agrees
// with the general decoder.
func FuzzFastRecord(f *testing.F) {
	for _, seed := range []string{
		`{"request_id":"r","tags":{"a":"b"},"device":{"width_px":400,"height_px":800,"fov_y_deg":45},"rules_ref":"phone","trace":[{"t_s":0,"lat":1,"lon":2},{"t_s":1,"lat":1.0001,"lon":2}],"candidates":[{"id":"m","lat":1.001,"lon":2,"priority":1}],"shown":[{"id":"m","first_shown_s":0,"shown_s":1,"intervals_s":[[0,1]]}],"predicted":[{"id":"m","p":[0.25,0.25,0.25,0.25]}]}`,
		`{"request_id":"r","tags":{"a":"b","a":"c"},"trace":[]}`,
		`{"request_id":"r","route":{"points":[{"lat":1,"lon":2},{"lat":1.01,"lon":2}],"speed_mps":[ 10 , 12 ]},"trace":[{"t_s":0,"lat":1,"lon":2}]}`,
		`{"request_id":"r\u0000","trace":null}`,
	} {
		f.Add([]byte(seed))
	}
	sets := fleetSets(f)
	f.Fuzz(func(t *testing.T, line []byte) { sameRecord(t, line, sets) })
}
