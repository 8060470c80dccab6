package rules

import (
	"errors"
	"math"
	"reflect"
	"slices"
	"testing"
)

// worked is the rule set of the worked examples. Its edges, 36 and 72 km/h, are 10 and 20 m/s, and its
// hysteresis, 9 km/h, is 2.5 m/s, so that every switching speed is a whole number of km/h that a
// multiple of 0.5 m/s reaches exactly under km/h = m/s × 3.6 (checked in TestWorkedSpeedsAreExact):
//
//	band 0 → 1 at ≥ 45 km/h (12.5 m/s)    band 1 → 0 below 27 km/h (7.5 m/s)
//	band 1 → 2 at ≥ 81 km/h (22.5 m/s)    band 2 → 1 below 63 km/h (17.5 m/s)
//
// Zooms 17, 16, 15 and pitches 40°, 50°, 60°; rates 0.5 zoom levels and 10° a second; within 200 m of
// a turn the zoom is at least 16.5; zoom clamped to [14, 18].
func worked() *Set {
	return &Set{
		Bands: []Band{
			{BelowKmh: Edge(36), Zoom: 17, PitchDeg: 40},
			{BelowKmh: Edge(72), Zoom: 16, PitchDeg: 50},
			{Zoom: 15, PitchDeg: 60},
		},
		HysteresisKmh:       9,
		MaxZoomRatePerS:     0.5,
		MaxPitchRateDegPerS: 10,
		Turn:                Turn{WithinM: 200, MinAngleDeg: 30, Zoom: 16.5},
		MinZoom:             14,
		MaxZoom:             18,
		MaxTurnRateDegPerS:  90,
	}
}

// below and above are the float64s just beside v: a speed one unit in the last place under or over a
// switching speed.
func below(v float64) float64 { return math.Nextafter(v, math.Inf(-1)) }
func above(v float64) float64 { return math.Nextafter(v, math.Inf(1)) }

func TestWorkedSpeedsAreExact(t *testing.T) {
	// Hand-computed: these m/s values times 3.6 are the whole km/h the tables rely on. The multiplication
	// is done on variables: Go folds constant expressions exactly, which would hide the rounding.
	for _, c := range []struct{ mps, kmh float64 }{
		{7.5, 27}, {10, 36}, {12.5, 45}, {17.5, 63}, {20, 72}, {22.5, 81},
	} {
		mps := c.mps
		if got := mps * 3.6; got != c.kmh {
			t.Errorf("%v m/s × 3.6 = %v km/h, want %v exactly", c.mps, got, c.kmh)
		}
		if got := below(mps) * 3.6; !(got < c.kmh) {
			t.Errorf("below(%v m/s) × 3.6 = %v km/h, want < %v", c.mps, got, c.kmh)
		}
	}
}

func TestConversionIsOneMultiplication(t *testing.T) {
	// Regression for the rule "km/h = m/s × 3.6 exactly": a speed written as E/3.6 m/s is not always E
	// km/h again. Hand-checked with float64 arithmetic: 60/3.6 = 16.666666666666668 and × 3.6 gives
	// 60.00000000000001 (upper band); 61/3.6 = 16.944444444444443 and × 3.6 gives 60.99999999999999
	// (lower band). An implementation that divides the edge by 3.6 instead puts both at the edge.
	for _, c := range []struct {
		edgeKmh  float64
		wantBand int
	}{{60, 1}, {61, 0}} {
		s := worked()
		s.Bands[0].BelowKmh = Edge(c.edgeKmh)
		s.Bands[1].BelowKmh = Edge(100)
		edge := c.edgeKmh
		st, err := s.Start(edge/3.6, 0, false)
		if err != nil {
			t.Fatalf("edge %v km/h: Start(%v, 0, false): %v", edge, edge/3.6, err)
		}
		if st.Band() != c.wantBand {
			t.Errorf("edge %v km/h, speed %v m/s (= %v km/h): band %d, want %d", edge, edge/3.6, edge/3.6*3.6, st.Band(), c.wantBand)
		}
	}
}

func TestBandHysteresis(t *testing.T) {
	// Hand-computed from SPEC §3 with the switching speeds listed at worked(). Speeds in m/s, one per
	// sample, 1 s apart; want is the band after each sample.
	cases := []struct {
		name   string
		hyst   float64 // km/h; -1 keeps worked()'s 9
		speeds []float64
		want   []int
	}{
		// First sample: the interval that holds the speed, no hysteresis; lower edges belong to the band.
		{"first at 0", -1, []float64{0}, []int{0}},
		{"first just below 36", -1, []float64{below(10)}, []int{0}},
		{"first at 36", -1, []float64{10}, []int{1}},
		{"first at 40, inside the hysteresis", -1, []float64{40 / 3.6}, []int{1}},
		{"first just below 72", -1, []float64{below(20)}, []int{1}},
		{"first at 72", -1, []float64{20}, []int{2}},
		{"first at 360", -1, []float64{100}, []int{2}},
		// Up across 36: the band changes only at 36 + 9 = 45 km/h.
		{"up to just below 45", -1, []float64{5, 10, 11, below(12.5)}, []int{0, 0, 0, 0}},
		{"up to 45", -1, []float64{5, 10, 12.5}, []int{0, 0, 1}},
		// Down across 36: the band changes only below 36 − 9 = 27 km/h; 27 itself stays.
		{"down to 27", -1, []float64{11, 9, 7.5}, []int{1, 1, 1}},
		{"down to just below 27", -1, []float64{11, 9, below(7.5)}, []int{1, 1, 0}},
		// Speed hovering around 36 does not move a settled band, from either side.
		{"jitter above, settled in 1", -1, []float64{10.5, 9, 11.5, 8, below(12.5), above(7.5)}, []int{1, 1, 1, 1, 1, 1}},
		{"jitter below, settled in 0", -1, []float64{9.5, 11, 8, below(12.5), 7.6}, []int{0, 0, 0, 0, 0}},
		// Both loops may move more than one band in one sample.
		{"two bands up", -1, []float64{2, 25}, []int{0, 2}},
		{"two bands up needs 81", -1, []float64{2, below(22.5), 22.5}, []int{0, 1, 2}},
		{"two bands down", -1, []float64{25, 5}, []int{2, 0}},
		{"down from 2 stops in 1", -1, []float64{25, below(17.5), 7.5}, []int{2, 1, 1}},
		{"down from 2 at 63 stays", -1, []float64{25, 17.5}, []int{2, 2}},
		// Without hysteresis the band follows the interval exactly, edge included.
		{"no hysteresis", 0, []float64{below(10), 10, below(10), 20, below(20)}, []int{0, 1, 0, 2, 1}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := worked()
			if c.hyst >= 0 {
				s.HysteresisKmh = c.hyst
			}
			st, err := s.Start(c.speeds[0], 0, false)
			if err != nil {
				t.Fatalf("Start(%v, 0, false): %v", c.speeds[0], err)
			}
			got := []int{st.Band()}
			for _, v := range c.speeds[1:] {
				if err := st.Step(1, v, 0, false); err != nil {
					t.Fatalf("Step(1, %v, 0, false): %v", v, err)
				}
				got = append(got, st.Band())
			}
			if !slices.Equal(got, c.want) {
				t.Fatalf("speeds %v m/s: bands %v, want %v", c.speeds, got, c.want)
			}
		})
	}
}

func ptr(v float64) *float64 { return &v }

func TestTargetsTurnAndClamp(t *testing.T) {
	// One sample each, so zoom and pitch are the targets (SPEC §3: "First sample: zoom = target").
	// Hand-computed from worked(): band zooms 17, 16, 15; turn zoom 16.5 within 200 m; clamp [14, 18].
	cases := []struct {
		name              string
		edit              func(*Set)
		speedMps          float64
		turn              *float64
		wantZoom, wantPit float64
	}{
		{"band 0, no turn", nil, 5, nil, 17, 40},
		{"band 2, no turn", nil, 30, nil, 15, 60},
		{"band 2, turn at 150 m: raised to 16.5", nil, 30, ptr(150), 16.5, 60},
		{"band 2, turn at exactly 200 m: within", nil, 30, ptr(200), 16.5, 60},
		{"band 2, turn at 200.5 m: outside", nil, 30, ptr(200.5), 15, 60},
		{"band 2, turn at 0 m", nil, 30, ptr(0), 16.5, 60},
		{"band 0, turn near: max keeps 17", nil, 5, ptr(10), 17, 40},
		{"band 1, turn near", nil, 15, ptr(199), 16.5, 50},
		{"clamp up to min_zoom", func(s *Set) { s.MinZoom = 15.5 }, 30, nil, 15.5, 60},
		{"clamp down to max_zoom", func(s *Set) { s.MaxZoom = 16.25 }, 5, nil, 16.25, 40},
		{"turn zoom clamped to max_zoom", func(s *Set) { s.Turn.Zoom = 19; s.MaxZoom = 18 }, 30, ptr(1), 18, 60},
		{"min_zoom = max_zoom pins the zoom", func(s *Set) { s.MinZoom, s.MaxZoom = 15.75, 15.75 }, 5, ptr(1), 15.75, 40},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := worked()
			if c.edit != nil {
				c.edit(s)
			}
			z, p, err := s.Evaluate([]Sample{{TS: 3, SpeedMps: c.speedMps, TurnDistM: c.turn}})
			if err != nil {
				t.Fatalf("Evaluate(speed %v m/s, turn %v): %v", c.speedMps, c.turn, err)
			}
			if z[0] != c.wantZoom || p[0] != c.wantPit {
				t.Errorf("Evaluate(speed %v m/s, turn %v) = zoom %v pitch %v, want %v %v (exact)", c.speedMps, c.turn, z[0], p[0], c.wantZoom, c.wantPit)
			}
		})
	}
}

func TestRateLimit(t *testing.T) {
	// Hand-computed, uneven Δt. All steps are multiples of 1/8, exact in binary, so the comparison is exact.
	//   t=0    5 m/s (18 km/h) band 0: zoom 17, pitch 40 (first sample: the targets).
	//   t=0.5  25 m/s (90 km/h): bands 0→1→2 (90 ≥ 45, 90 ≥ 81); targets 15, 60.
	//          zoom 17 − 0.5·0.5 = 16.75; pitch 40 + 10·0.5 = 45.
	//   t=2.5  Δt 2: zoom 16.75 − 1 = 15.75; pitch 45 + 20 = 65 passes 60, so 60.
	//   t=2.75 Δt 0.25: zoom 15.75 − 0.125 = 15.625.
	//   t=4    Δt 1.25: step 0.625 = 15.625 − 15, so zoom lands on 15.
	//   t=5    turn at 100 m: target max(15, 16.5) = 16.5; zoom 15 + 0.5 = 15.5.
	//   t=5.5  turn gone: target 15; zoom 15.5 − 0.25 = 15.25.
	//   t=6.5  speed 5 m/s (18 km/h): 18 < 63 → band 1, 18 < 27 → band 0; targets 17, 40.
	//          zoom 15.25 + 0.5 = 15.75; pitch 60 − 10 = 50.
	//   t=10.5 Δt 4: zoom 15.75 + 2 passes 17, so 17; pitch 50 − 40 passes 40, so 40.
	s := worked()
	samples := []Sample{
		{TS: 0, SpeedMps: 5},
		{TS: 0.5, SpeedMps: 25},
		{TS: 2.5, SpeedMps: 25},
		{TS: 2.75, SpeedMps: 25},
		{TS: 4, SpeedMps: 25},
		{TS: 5, SpeedMps: 25, TurnDistM: ptr(100)},
		{TS: 5.5, SpeedMps: 25},
		{TS: 6.5, SpeedMps: 5},
		{TS: 10.5, SpeedMps: 5},
	}
	wantZoom := []float64{17, 16.75, 15.75, 15.625, 15, 15.5, 15.25, 15.75, 17}
	wantPitch := []float64{40, 45, 60, 60, 60, 60, 60, 50, 40}
	z, p, err := s.Evaluate(samples)
	if err != nil {
		t.Fatalf("Evaluate: %v", err)
	}
	if !slices.Equal(z, wantZoom) {
		t.Fatalf("Evaluate zoom = %v, want %v", z, wantZoom)
	}
	if !slices.Equal(p, wantPitch) {
		t.Fatalf("Evaluate pitch = %v, want %v", p, wantPitch)
	}
}

func TestFirstSampleHasNoHysteresis(t *testing.T) {
	// Hand-computed: starting at 40 km/h (inside band 1's interval [36, 72) but short of the 45 km/h
	// that would switch 0 → 1 later) gives band 1 at once, zoom 16 and pitch 50 with no ramp. The same
	// speed reached from 18 km/h stays in band 0.
	s := worked()
	v := 40 / 3.6
	z, p, err := s.Evaluate([]Sample{{TS: 0, SpeedMps: v}})
	if err != nil {
		t.Fatalf("Evaluate(40 km/h): %v", err)
	}
	if want := []float64{16}; !slices.Equal(z, want) {
		t.Fatalf("Evaluate(40 km/h) zoom = %v, want %v", z, want)
	}
	if want := []float64{50}; !slices.Equal(p, want) {
		t.Fatalf("Evaluate(40 km/h) pitch = %v, want %v", p, want)
	}
	z, p, err = s.Evaluate([]Sample{{TS: 0, SpeedMps: 5}, {TS: 10, SpeedMps: v}})
	if err != nil {
		t.Fatalf("Evaluate(18 km/h, then 40 km/h): %v", err)
	}
	if want := []float64{17, 17}; !slices.Equal(z, want) {
		t.Fatalf("Evaluate(18 km/h, then 40 km/h) zoom = %v, want %v", z, want)
	}
	if want := []float64{40, 40}; !slices.Equal(p, want) {
		t.Fatalf("Evaluate(18 km/h, then 40 km/h) pitch = %v, want %v", p, want)
	}
}

func TestEvaluateRejectsBadSamples(t *testing.T) {
	s := worked()
	cases := []struct {
		name      string
		samples   []Sample
		kind      ProblemKind
		wantError string
	}{
		{"time repeats", []Sample{{TS: 1}, {TS: 2}, {TS: 2}}, KindOrder,
			"samples[2].t_s: 2 is not after samples[1].t_s 2: times must increase strictly"},
		{"time goes back", []Sample{{TS: 1}, {TS: 0.5}}, KindOrder,
			"samples[1].t_s: 0.5 is not after samples[0].t_s 1: times must increase strictly"},
		{"time NaN", []Sample{{TS: math.NaN()}}, KindNotFinite, "samples[0].t_s: NaN is not a finite number"},
		{"time Inf", []Sample{{TS: 0}, {TS: math.Inf(1)}}, KindNotFinite, "samples[1].t_s: +Inf is not a finite number"},
		{"negative speed", []Sample{{TS: 0}, {TS: 1, SpeedMps: -0.5}}, KindRange, "samples[1].speed_mps: -0.5 is outside [0, +Inf)"},
		{"speed NaN", []Sample{{TS: 0, SpeedMps: math.NaN()}}, KindNotFinite, "samples[0].speed_mps: NaN is not a finite number"},
		{"negative turn distance", []Sample{{TS: 0, TurnDistM: ptr(-1)}}, KindRange, "samples[0].turn_dist_m: -1 is outside [0, +Inf)"},
		{"turn distance Inf", []Sample{{TS: 0, TurnDistM: ptr(math.Inf(1))}}, KindNotFinite, "samples[0].turn_dist_m: +Inf is not a finite number"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			z, p, err := s.Evaluate(c.samples)
			if z != nil {
				t.Fatalf("Evaluate zoom = %v (error %v), want nil", z, err)
			}
			if p != nil {
				t.Fatalf("Evaluate pitch = %v (error %v), want nil", p, err)
			}
			var fe *Problem
			if !errors.As(err, &fe) {
				t.Fatalf("Evaluate: error %v is not a *Problem", err)
			}
			if fe.Kind != c.kind {
				t.Fatalf("Evaluate: Problem.Kind = %v, want %v", fe.Kind, c.kind)
			}
			if err.Error() != c.wantError {
				t.Fatalf("Evaluate: error %q, want %q", err, c.wantError)
			}
		})
	}
}

func TestEvaluateEdgeCases(t *testing.T) {
	s := worked()
	z, p, err := s.Evaluate(nil)
	if err != nil {
		t.Fatalf("Evaluate(nil): %v", err)
	}
	if z == nil {
		t.Fatalf("Evaluate(nil) zoom = nil, want an empty slice (the wire writes [] not null)")
	}
	if len(z) != 0 {
		t.Fatalf("Evaluate(nil) zoom = %v, want empty", z)
	}
	if len(p) != 0 {
		t.Fatalf("Evaluate(nil) pitch = %v, want empty", p)
	}

	// Times so far apart that their difference overflows: the gap counts as long enough to reach the
	// target (17 → 15 and 40 → 60), and nothing becomes NaN.
	z, p, err = s.Evaluate([]Sample{{TS: -math.MaxFloat64, SpeedMps: 5}, {TS: math.MaxFloat64, SpeedMps: 30}})
	if err != nil {
		t.Fatalf("Evaluate(t = ∓MaxFloat64): %v", err)
	}
	if want := []float64{17, 15}; !slices.Equal(z, want) {
		t.Fatalf("Evaluate(t = ∓MaxFloat64) zoom = %v, want %v", z, want)
	}
	if want := []float64{40, 60}; !slices.Equal(p, want) {
		t.Fatalf("Evaluate(t = ∓MaxFloat64) pitch = %v, want %v", p, want)
	}

	// An invalid set is refused before any sample is read.
	bad := worked()
	bad.MaxZoomRatePerS = 0
	_, _, err = bad.Evaluate([]Sample{{TS: 0}})
	if want := "max_zoom_rate_per_s: 0 is outside (0, +Inf)"; err == nil || err.Error() != want {
		t.Fatalf("Evaluate with max_zoom_rate_per_s 0: error %v, want %q", err, want)
	}
}

func TestStateErrors(t *testing.T) {
	var zero State
	err := zero.Step(1, 1, 0, false)
	var fe *Problem
	if !errors.As(err, &fe) {
		t.Fatalf("zero State: Step(1, 1, 0, false) = %v, want a *Problem", err)
	}
	if fe.Kind != KindNotStarted {
		t.Fatalf("zero State: Step(1, 1, 0, false): Problem.Kind = %v, want %v", fe.Kind, KindNotStarted)
	}

	s := worked()
	_, err = s.Start(-1, 0, false)
	if want := "speed_mps: -1 is outside [0, +Inf)"; err == nil || err.Error() != want {
		t.Fatalf("Start(-1, 0, false) = %v, want error %q", err, want)
	}
	_, err = s.Start(1, math.NaN(), true)
	if want := "turn_dist_m: NaN is not a finite number"; err == nil || err.Error() != want {
		t.Fatalf("Start(1, NaN, true) = %v, want error %q", err, want)
	}
	_, err = s.Start(1, math.NaN(), false) // no turn: the distance is not read
	if err != nil {
		t.Fatalf("Start(1, NaN, false) = %v, want nil", err)
	}

	st, err := s.Start(5, 0, false)
	if err != nil {
		t.Fatalf("Start(5, 0, false): %v", err)
	}
	before := st
	for _, c := range []struct {
		dt, speed float64
		want      string
	}{
		{0, 5, "dt_s: 0 is outside (0, +Inf)"},
		{-1, 5, "dt_s: -1 is outside (0, +Inf)"},
		{math.Inf(1), 5, "dt_s: +Inf is not a finite number"},
		{math.NaN(), 5, "dt_s: NaN is not a finite number"},
		{1, math.Inf(1), "speed_mps: +Inf is not a finite number"},
	} {
		if err := st.Step(c.dt, c.speed, 0, false); err == nil || err.Error() != c.want {
			t.Fatalf("Step(%v, %v, 0, false) = %v, want error %q", c.dt, c.speed, err, c.want)
		}
		if !reflect.DeepEqual(st, before) {
			t.Fatalf("after the refused Step(%v, %v, 0, false): state %+v, want %+v (a refused step leaves the state as it was)", c.dt, c.speed, st, before)
		}
	}

	bad := worked()
	bad.Bands = nil
	_, err = bad.Start(1, 0, false)
	if want := "bands: empty: at least one band is needed"; err == nil || err.Error() != want {
		t.Fatalf("Start with no bands = %v, want error %q", err, want)
	}
}

func TestTurnHeadingDeg(t *testing.T) {
	// Hand-computed: the short way round, at most maxStep, result in [0, 360).
	nan := math.NaN()
	inf := math.Inf(1)
	cases := []struct{ cur, tgt, step, want float64 }{
		{10, 20, 5, 15},
		{10, 20, 10, 20},
		{10, 20, 30, 20},
		{20, 10, 4, 16},
		{350, 10, 15, 5},      // across north clockwise: 350 → 365 = 5
		{350, 10, 25, 10},     // reaches the target
		{10, 350, 15, 355},    // across north anticlockwise: 10 → −5 = 355
		{5, 355, 5, 0},        // lands exactly on north, written 0 not 360
		{355, 5, 5, 0},        // the same clockwise
		{0, 180, 30, 30},      // exactly opposite: clockwise
		{180, 0, 30, 210},     // exactly opposite: clockwise
		{90, 270, 200, 270},   // opposite and within reach
		{-90, 90, 10, 280},    // inputs outside [0, 360) are normalised: 270 → 90 is opposite, clockwise
		{720, -1, 0.5, 359.5}, // 0 → 359: anticlockwise 1°, limited to 0.5°
		{30, 40, 0, 30},
		{30, 40, -5, 30},
		{30, 400, inf, 40},
		{0, 0, 0, 0},
	}
	for _, c := range cases {
		if got := TurnHeadingDeg(c.cur, c.tgt, c.step); got != c.want || math.Signbit(got) {
			t.Errorf("TurnHeadingDeg(%v, %v, %v) = %v, want %v", c.cur, c.tgt, c.step, got, c.want)
		}
	}
	for _, c := range [][3]float64{{nan, 0, 1}, {0, nan, 1}, {0, 1, nan}, {inf, 0, 1}, {0, -inf, 1}} {
		if got := TurnHeadingDeg(c[0], c[1], c[2]); !math.IsNaN(got) {
			t.Errorf("TurnHeadingDeg(%v, %v, %v) = %v, want NaN", c[0], c[1], c[2], got)
		}
	}
	// A tiny negative heading is 360 − ε, which rounds to 360: the result must still be below 360.
	if got := TurnHeadingDeg(-1e-20, -1e-20, 1); got != 0 {
		t.Errorf("TurnHeadingDeg(-1e-20, -1e-20, 1) = %v, want 0", got)
	}
}
