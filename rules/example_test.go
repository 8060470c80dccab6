package rules_test

import (
	"fmt"

	"github.com/viewspec/viewspec/rules"
)

const cityRules = `# two bands: town below 50 km/h, open road above
bands:
  - below_kmh: 50
    zoom: 17
    pitch_deg: 45
  - zoom: 15
    pitch_deg: 60
hysteresis_kmh: 5
max_zoom_rate_per_s: 0.5
max_pitch_rate_deg_per_s: 10
turn: {within_m: 150, min_angle_deg: 30, zoom: 16.5}
min_zoom: 14
max_zoom: 18
max_turn_rate_deg_per_s: 60
`

func ExampleParse() {
	set, err := rules.Parse([]byte(cityRules), "city.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(set.Bands), "bands, hysteresis", set.HysteresisKmh, "km/h")

	_, err = rules.Parse([]byte("bands:\n  - zoom: 31\n    pitch_deg: 45\n"), "bad.yaml")
	fmt.Println(err)
	// Output:
	// 2 bands, hysteresis 5 km/h
	// bad.yaml:1:1: hysteresis_kmh: missing
	// bad.yaml:1:1: max_pitch_rate_deg_per_s: missing
	// bad.yaml:1:1: max_turn_rate_deg_per_s: missing
	// bad.yaml:1:1: max_zoom: missing
	// bad.yaml:1:1: max_zoom_rate_per_s: missing
	// bad.yaml:1:1: min_zoom: missing
	// bad.yaml:1:1: turn: missing
	// bad.yaml:2:11: bands[0].zoom: 31 is outside [0, 30]
}

func ExampleSet_Evaluate() {
	set, err := rules.Parse([]byte(cityRules), "city.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	turn := 120.0
	samples := []rules.Sample{
		{TS: 0, SpeedMps: 10},                    // 36 km/h: town, zoom 17, pitch 45°
		{TS: 1, SpeedMps: 15},                    // 54 km/h: past 50 but short of 50 + 5, still town
		{TS: 2, SpeedMps: 20},                    // 72 km/h: open road; zoom glides 0.5 a second
		{TS: 4, SpeedMps: 20},                    // two seconds later: 15.5, pitch 60° reached
		{TS: 5, SpeedMps: 20, TurnDistM: &turn},  // 120 m before a turn: aim for 16.5
		{TS: 10, SpeedMps: 20, TurnDistM: &turn}, // there after 2 s
	}
	zoom, pitch, err := set.Evaluate(samples)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range samples {
		fmt.Printf("t=%-2v zoom %-5v pitch %v\n", samples[i].TS, zoom[i], pitch[i])
	}
	// Output:
	// t=0  zoom 17    pitch 45
	// t=1  zoom 17    pitch 45
	// t=2  zoom 16.5  pitch 55
	// t=4  zoom 15.5  pitch 60
	// t=5  zoom 16    pitch 60
	// t=10 zoom 16.5  pitch 60
}

func ExampleSet_Start() {
	set, err := rules.Parse([]byte(cityRules), "city.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	// The drive timeline's loop: one Step a tick, no allocation.
	st, err := set.Start(20, 0, false)
	if err != nil {
		fmt.Println(err)
		return
	}
	for tick := 1; tick <= 8; tick++ {
		if err := st.Step(0.25, 5, 0, false); err != nil { // slowed to 18 km/h
			fmt.Println(err)
			return
		}
	}
	fmt.Println("band", st.Band(), "zoom", st.Zoom(), "pitch", st.PitchDeg())
	// Output:
	// band 0 zoom 16 pitch 45
}

func ExampleLint() {
	data := []byte(`bands:
  - below_kmh: 40
    zoom: 16
    pitch_deg: 45
  - zoom: 16.5
    pitch_deg: 55
hysteresis_kmh: 5
max_zoom_rate_per_s: 0.5
max_pitch_rate_deg_per_s: 10
turn: {within_m: 150, min_angle_deg: 30, zoom: 15}
min_zoom: 14
max_zoom: 18
max_turn_rate_deg_per_s: 60
`)
	for _, f := range rules.Lint(data, "draft.yaml") {
		fmt.Println(f)
	}
	// Output:
	// draft.yaml:5:11: warning: bands[1].zoom: zoom 16.5 is above zoom 16 of the slower bands[0]: the map would zoom in as the speed rises
	// draft.yaml:10:48: warning: turn.zoom: 15 is at or below every band's zoom (the lowest is 16), so the turn override never changes the zoom
}

func ExampleTurnHeadingDeg() {
	// Heading 350°, the road now goes to 20°: at 60°/s and 0.25 s a tick the map turns 15° a tick,
	// clockwise across north.
	h := 350.0
	for tick := 1; tick <= 3; tick++ {
		h = rules.TurnHeadingDeg(h, 20, 60*0.25)
		fmt.Println(h)
	}
	// Output:
	// 5
	// 20
	// 20
}
