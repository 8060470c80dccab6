package viewport

// TimelineNaive is the timeline with the naive visibility search: a camera
// prepared in full and every marker projected from latitude and longitude
// at every tick. It is the test oracle of the indexed search and the
// baseline of its benchmark.
func TimelineNaive(d *Drive, ms []Marker) ([]MarkerTimeline, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	_, rank, err := rankMarkers(ms)
	if err != nil {
		return nil, err
	}
	merc, _, _ := rankMarkers(ms)
	r := newDriveRun(d, merc, rank)
	r.see = func(r *driveRun, k int32, v *View) {
		full, err := Prepare(v.cam)
		if err != nil {
			panic(err) // place accepted the same camera
		}
		for i, m := range ms {
			if sp := full.Project(m.Point); sp.InView() {
				r.visTick[i] = k
				r.visible = append(r.visible, int32(i))
			}
		}
	}
	return r.run()
}
