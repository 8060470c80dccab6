package rules

import (
	"errors"
	"math"
	"slices"
	"testing"
)

func TestValidateAcceptsWorked(t *testing.T) {
	if err := worked().Validate(); err != nil {
		t.Fatalf("worked().Validate() = %v, want nil", err)
	}
	one := &Set{Bands: []Band{{Zoom: 16, PitchDeg: 0}}, MaxZoomRatePerS: 1, MaxPitchRateDegPerS: 1,
		Turn: Turn{WithinM: 0, MinAngleDeg: 180, Zoom: 30}, MinZoom: 0, MaxZoom: 30, MaxTurnRateDegPerS: 1}
	if err := one.Validate(); err != nil {
		t.Fatalf("Validate() of one band, every field at an inclusive bound = %v, want nil", err)
	}
}

func TestValidateAllocatesNothing(t *testing.T) {
	s := worked()
	if n := testing.AllocsPerRun(100, func() { _ = s.Validate() }); n != 0 {
		t.Errorf("Validate on a valid set allocates %v times a run, want 0", n)
	}
}

func TestValidateProblems(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name string
		edit func(*Set)
		want []string // kind and message of each Problem, in order
	}{
		{"no bands", func(s *Set) { s.Bands = nil }, []string{"missing bands: empty: at least one band is needed"}},
		{"edge missing on a middle band", func(s *Set) { s.Bands[0].BelowKmh = nil },
			[]string{"missing bands[0].below_kmh: missing: every band but the last needs its upper edge"}},
		{"edge on the last band", func(s *Set) { s.Bands[2].BelowKmh = Edge(100) },
			[]string{"last-band-edge bands[2].below_kmh: 100 given on the last band, which has no upper edge (it holds every speed above the edge before it)"}},
		{"edges equal", func(s *Set) { s.Bands[1].BelowKmh = Edge(36) },
			[]string{"order bands[1].below_kmh: 36 is not above bands[0].below_kmh 36: band edges must increase strictly"}},
		{"edges decreasing", func(s *Set) { s.Bands[1].BelowKmh = Edge(20) },
			[]string{"order bands[1].below_kmh: 20 is not above bands[0].below_kmh 36: band edges must increase strictly"}},
		{"edge zero", func(s *Set) { s.Bands[0].BelowKmh = Edge(0) }, []string{"range bands[0].below_kmh: 0 is outside (0, +Inf)"}},
		{"edge NaN", func(s *Set) { s.Bands[0].BelowKmh = Edge(nan) }, []string{"not-finite bands[0].below_kmh: NaN is not a finite number"}},
		{"zoom 31", func(s *Set) { s.Bands[1].Zoom = 31 }, []string{"range bands[1].zoom: 31 is outside [0, 30]"}},
		{"zoom negative", func(s *Set) { s.Bands[1].Zoom = -0.5 }, []string{"range bands[1].zoom: -0.5 is outside [0, 30]"}},
		{"pitch 90", func(s *Set) { s.Bands[2].PitchDeg = 90 }, []string{"range bands[2].pitch_deg: 90 is outside [0, 90)"}},
		{"pitch negative", func(s *Set) { s.Bands[0].PitchDeg = -1 }, []string{"range bands[0].pitch_deg: -1 is outside [0, 90)"}},
		{"pitch Inf", func(s *Set) { s.Bands[0].PitchDeg = -inf }, []string{"not-finite bands[0].pitch_deg: -Inf is not a finite number"}},
		{"hysteresis negative", func(s *Set) { s.HysteresisKmh = -2 }, []string{"range hysteresis_kmh: -2 is outside [0, +Inf)"}},
		{"zoom rate 0", func(s *Set) { s.MaxZoomRatePerS = 0 }, []string{"range max_zoom_rate_per_s: 0 is outside (0, +Inf)"}},
		{"pitch rate negative", func(s *Set) { s.MaxPitchRateDegPerS = -3 }, []string{"range max_pitch_rate_deg_per_s: -3 is outside (0, +Inf)"}},
		{"turn rate Inf", func(s *Set) { s.MaxTurnRateDegPerS = inf }, []string{"not-finite max_turn_rate_deg_per_s: +Inf is not a finite number"}},
		{"within_m negative", func(s *Set) { s.Turn.WithinM = -10 }, []string{"range turn.within_m: -10 is outside [0, +Inf)"}},
		{"min_angle 0", func(s *Set) { s.Turn.MinAngleDeg = 0 }, []string{"range turn.min_angle_deg: 0 is outside (0, 180]"}},
		{"min_angle 181", func(s *Set) { s.Turn.MinAngleDeg = 181 }, []string{"range turn.min_angle_deg: 181 is outside (0, 180]"}},
		{"turn zoom NaN", func(s *Set) { s.Turn.Zoom = nan }, []string{"not-finite turn.zoom: NaN is not a finite number"}},
		{"min_zoom above max_zoom", func(s *Set) { s.MinZoom, s.MaxZoom = 17, 16 }, []string{"min-above-max min_zoom: 17 is above max_zoom 16"}},
		{"max_zoom 30.5", func(s *Set) { s.MaxZoom = 30.5 }, []string{"range max_zoom: 30.5 is outside [0, 30]"}},
		{"several, in field order", func(s *Set) {
			s.Bands[0].Zoom = 40
			s.HysteresisKmh = nan
			s.MinZoom = -1
		}, []string{
			"range bands[0].zoom: 40 is outside [0, 30]",
			"not-finite hysteresis_kmh: NaN is not a finite number",
			"range min_zoom: -1 is outside [0, 30]",
		}},
		{"out-of-range edge is not also reported out of order", func(s *Set) { s.Bands[0].BelowKmh = Edge(-5) },
			[]string{"range bands[0].below_kmh: -5 is outside (0, +Inf)"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := worked()
			c.edit(s)
			err := s.Validate()
			var errs Errors
			if !errors.As(err, &errs) {
				t.Fatalf("Validate() = %v, want Errors", err)
			}
			var got []string
			for _, e := range errs {
				got = append(got, e.Kind.String()+" "+e.Error())
			}
			if !slices.Equal(got, c.want) {
				t.Fatalf("Validate() problems = %q, want %q", got, c.want)
			}
			var fe *Problem
			if !errors.As(err, &fe) {
				t.Fatalf("Validate() = %v: errors.As finds no *Problem, want each problem reachable", err)
			}
		})
	}
}

func TestWarnings(t *testing.T) {
	// worked() has none: zooms fall, hysteresis 9 < 36 (first band) and 2·9 < 36 (band 1), turn zoom
	// 16.5 is above bands 1 and 2.
	if ws := worked().warnings(); len(ws) != 0 {
		t.Fatalf("worked().warnings() = %v, want none", ws)
	}
	cases := []struct {
		name string
		edit func(*Set)
		want []string
	}{
		{"zoom rises", func(s *Set) { s.Bands[2].Zoom = 16.5 }, []string{
			"zoom-rises bands[2].zoom: zoom 16.5 is above zoom 16 of the slower bands[1]: the map would zoom in as the speed rises",
		}},
		{"zoom rises against the lowest slower band", func(s *Set) { s.Bands[0].Zoom = 15; s.Bands[2].Zoom = 15.5 }, []string{
			"zoom-rises bands[1].zoom: zoom 16 is above zoom 15 of the slower bands[0]: the map would zoom in as the speed rises",
			"zoom-rises bands[2].zoom: zoom 15.5 is above zoom 15 of the slower bands[0]: the map would zoom in as the speed rises",
		}},
		{"equal zooms are fine", func(s *Set) { s.Bands[1].Zoom = 17; s.Bands[2].Zoom = 17; s.Turn.Zoom = 17.5 }, nil},
		// Band 1 spans 36 to 72: 36 km/h wide. Hysteresis 18 is exactly half: held on [54, 90) speeding
		// up and [18, 54) slowing down.
		{"hysteresis half a band", func(s *Set) { s.HysteresisKmh = 18 }, []string{
			"wide-hysteresis bands[1].below_kmh: hysteresis_kmh 18 is at least half the width 36 of bands[1] (36 to 72 km/h): speeding up it is held on [54, 90), slowing down on [18, 54), and no speed is in both",
		}},
		{"hysteresis just under half a band", func(s *Set) { s.HysteresisKmh = 17.5 }, nil},
		// Of equal zooms the first is the slower band a rise is measured from.
		{"zoom rising after two equal bands", func(s *Set) { s.Bands[0].Zoom, s.Bands[1].Zoom, s.Bands[2].Zoom = 16, 16, 16.2 }, []string{
			"zoom-rises bands[2].zoom: zoom 16.2 is above zoom 16 of the slower bands[0]: the map would zoom in as the speed rises",
		}},
		{"hysteresis as wide as the first band", func(s *Set) { s.HysteresisKmh = 36; s.Bands[1].BelowKmh = Edge(200) }, []string{
			"wide-hysteresis bands[0].below_kmh: hysteresis_kmh 36 is at least the first band's upper edge 36: once the speed reaches 72 km/h the first band is never entered again (that needs a speed below 0)",
		}},
		{"turn zoom below every band", func(s *Set) { s.Turn.Zoom = 15 }, []string{
			"turn-inert turn.zoom: 15 is at or below every band's zoom (the lowest is 15), so the turn override never changes the zoom",
		}},
		{"turn zoom at min_zoom", func(s *Set) { s.Turn.Zoom = 15.5; s.MinZoom = 15.5 }, []string{
			"turn-inert turn.zoom: 15.5 is at or below min_zoom 15.5, so clamping undoes the turn override",
		}},
		{"bands under the turn zoom all at max_zoom", func(s *Set) { s.MaxZoom = 15; s.Turn.Zoom = 16.5 }, []string{
			"turn-inert turn.zoom: every band zoom below 16.5 is already at or above max_zoom 15, so clamping undoes the turn override",
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := worked()
			c.edit(s)
			if err := s.Validate(); err != nil {
				t.Fatalf("Validate() = %v, want nil (warnings are looked for on valid sets only)", err)
			}
			var got []string
			for _, w := range s.warnings() {
				got = append(got, w.Kind.String()+" "+w.Error())
			}
			if !slices.Equal(got, c.want) {
				t.Fatalf("warnings() = %q, want %q", got, c.want)
			}
		})
	}
}
