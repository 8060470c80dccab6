package rules

import (
	"fmt"
	"math"
	"testing"

	"pgregory.net/rapid"
)

// rateSlack bounds the rounding in one rate-limited step: zoom ± rate·Δt is one float64 addition on
// values below 90, so it may land one unit in the last place (at most 1.5e-14) beyond the exact step.
const rateSlack = 1e-12

// logUniform draws from [lo, hi] with a uniform logarithm, to reach both tiny and large magnitudes.
func logUniform(t *rapid.T, lo, hi float64, label string) float64 {
	return math.Exp(rapid.Float64Range(math.Log(lo), math.Log(hi)).Draw(t, label))
}

// genSet draws a valid rule set.
func genSet(t *rapid.T) *Set {
	n := rapid.IntRange(1, 6).Draw(t, "bands")
	s := &Set{Bands: make([]Band, n)}
	edge := 0.0
	for i := range s.Bands {
		if i < n-1 {
			edge += logUniform(t, 0.5, 80, fmt.Sprintf("bands[%d] width km/h", i))
			s.Bands[i].BelowKmh = Edge(edge)
		}
		s.Bands[i].Zoom = rapid.Float64Range(0, 30).Draw(t, fmt.Sprintf("bands[%d].zoom", i))
		s.Bands[i].PitchDeg = rapid.Float64Range(0, 89.9).Draw(t, fmt.Sprintf("bands[%d].pitch_deg", i))
	}
	if rapid.Bool().Draw(t, "hysteresis") {
		s.HysteresisKmh = logUniform(t, 0.01, 30, "hysteresis_kmh")
	}
	s.MaxZoomRatePerS = logUniform(t, 1e-3, 100, "max_zoom_rate_per_s")
	s.MaxPitchRateDegPerS = logUniform(t, 1e-2, 1000, "max_pitch_rate_deg_per_s")
	s.Turn = Turn{
		WithinM:     rapid.Float64Range(0, 2000).Draw(t, "turn.within_m"),
		MinAngleDeg: rapid.Float64Range(1, 180).Draw(t, "turn.min_angle_deg"),
		Zoom:        rapid.Float64Range(0, 30).Draw(t, "turn.zoom"),
	}
	s.MinZoom = rapid.Float64Range(0, 30).Draw(t, "min_zoom")
	s.MaxZoom = rapid.Float64Range(s.MinZoom, 30).Draw(t, "max_zoom")
	s.MaxTurnRateDegPerS = logUniform(t, 1, 720, "max_turn_rate_deg_per_s")
	return s
}

// genSamples draws 1 to 60 samples at strictly increasing, unevenly spaced times.
func genSamples(t *rapid.T) []Sample {
	n := rapid.IntRange(1, 60).Draw(t, "samples")
	out := make([]Sample, n)
	ts := rapid.Float64Range(-100, 100).Draw(t, "t0_s")
	for i := range out {
		if i > 0 {
			ts += logUniform(t, 1e-3, 20, fmt.Sprintf("samples[%d] dt_s", i))
		}
		out[i].TS = ts
		if rapid.IntRange(0, 9).Draw(t, fmt.Sprintf("samples[%d] standing", i)) > 0 {
			out[i].SpeedMps = rapid.Float64Range(0, 70).Draw(t, fmt.Sprintf("samples[%d].speed_mps", i))
		}
		if rapid.Bool().Draw(t, fmt.Sprintf("samples[%d] turn ahead", i)) {
			out[i].TurnDistM = ptr(logUniform(t, 0.1, 5000, fmt.Sprintf("samples[%d].turn_dist_m", i)))
		}
	}
	return out
}

func TestGeneratorsMakeValidInput(t *testing.T) {
	// The generators' own check: every drawn set is valid and every drawn sample list evaluates, and the
	// draws reach what the properties need (several bands, hysteresis, turns within reach).
	var multi, hyst, turnsNear int
	rapid.Check(t, func(t *rapid.T) {
		s := genSet(t)
		if err := s.Validate(); err != nil {
			t.Fatalf("genSet drew an invalid set: %v", err)
		}
		samples := genSamples(t)
		if _, _, err := s.Evaluate(samples); err != nil {
			t.Fatalf("genSamples drew bad samples: %v", err)
		}
		if len(s.Bands) > 1 {
			multi++
		}
		if s.HysteresisKmh > 0 {
			hyst++
		}
		for _, smp := range samples {
			if smp.TurnDistM != nil && *smp.TurnDistM <= s.Turn.WithinM {
				turnsNear++
				break
			}
		}
	})
	if multi == 0 || hyst == 0 || turnsNear == 0 {
		t.Errorf("generators miss cases: %d multi-band sets, %d with hysteresis, %d with a turn in reach", multi, hyst, turnsNear)
	}
}

// specEvaluate is SPEC §3 transcribed word for word, independent of State, as an oracle.
func specEvaluate(s *Set, samples []Sample) (zoom, pitch []float64) {
	var b int
	var z, p float64
	for i, smp := range samples {
		kmh := smp.SpeedMps * 3.6
		if i == 0 {
			b = len(s.Bands) - 1
			for j := 0; j < len(s.Bands)-1; j++ {
				lo := 0.0
				if j > 0 {
					lo = *s.Bands[j-1].BelowKmh
				}
				if kmh >= lo && kmh < *s.Bands[j].BelowKmh {
					b = j
					break
				}
			}
		} else {
			for b != len(s.Bands)-1 && kmh >= *s.Bands[b].BelowKmh+s.HysteresisKmh {
				b++
			}
			for b > 0 && kmh < *s.Bands[b-1].BelowKmh-s.HysteresisKmh {
				b--
			}
		}
		tz := s.Bands[b].Zoom
		if smp.TurnDistM != nil && *smp.TurnDistM <= s.Turn.WithinM {
			tz = math.Max(tz, s.Turn.Zoom)
		}
		tz = math.Min(math.Max(tz, s.MinZoom), s.MaxZoom)
		tp := s.Bands[b].PitchDeg
		if i == 0 {
			z, p = tz, tp
		} else {
			dt := smp.TS - samples[i-1].TS
			clamp := func(d, m float64) float64 { return math.Max(-m, math.Min(m, d)) }
			z += clamp(tz-z, s.MaxZoomRatePerS*dt)
			p += clamp(tp-p, s.MaxPitchRateDegPerS*dt)
		}
		zoom, pitch = append(zoom, z), append(pitch, p)
	}
	return zoom, pitch
}

func TestPropEvaluateMatchesStateAndSpec(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := genSet(t)
		samples := genSamples(t)
		zoom, pitch, err := s.Evaluate(samples)
		if err != nil {
			t.Fatal(err)
		}
		// The streaming form gives exactly the same numbers.
		var st State
		for i, smp := range samples {
			d, has := 0.0, smp.TurnDistM != nil
			if has {
				d = *smp.TurnDistM
			}
			if i == 0 {
				st, err = s.Start(smp.SpeedMps, d, has)
			} else {
				err = st.Step(smp.TS-samples[i-1].TS, smp.SpeedMps, d, has)
			}
			if err != nil {
				t.Fatal(err)
			}
			if st.Zoom() != zoom[i] || st.PitchDeg() != pitch[i] {
				t.Fatalf("sample %d: State zoom %v pitch %v, Evaluate %v %v (want exact)", i, st.Zoom(), st.PitchDeg(), zoom[i], pitch[i])
			}
		}
		// The literal transcription of SPEC §3 agrees within the last-place rounding of a landing step.
		wz, wp := specEvaluate(s, samples)
		for i := range samples {
			if math.Abs(zoom[i]-wz[i]) > rateSlack || math.Abs(pitch[i]-wp[i]) > rateSlack {
				t.Fatalf("sample %d: Evaluate zoom %v pitch %v, spec %v %v (off by %g, %g; tolerance %g)",
					i, zoom[i], pitch[i], wz[i], wp[i], zoom[i]-wz[i], pitch[i]-wp[i], rateSlack)
			}
		}
	})
}

func TestPropRatesAndBounds(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := genSet(t)
		samples := genSamples(t)
		zoom, pitch, err := s.Evaluate(samples)
		if err != nil {
			t.Fatal(err)
		}
		for i := range samples {
			if zoom[i] < s.MinZoom || zoom[i] > s.MaxZoom {
				t.Fatalf("sample %d: zoom %v outside [min_zoom %v, max_zoom %v]", i, zoom[i], s.MinZoom, s.MaxZoom)
			}
			if !(pitch[i] >= 0 && pitch[i] < 90) {
				t.Fatalf("sample %d: pitch %v outside [0, 90)", i, pitch[i])
			}
			if i == 0 {
				continue
			}
			dt := samples[i].TS - samples[i-1].TS
			if dz := math.Abs(zoom[i] - zoom[i-1]); dz > s.MaxZoomRatePerS*dt+rateSlack {
				t.Fatalf("sample %d: zoom moved %v in %v s, rate %v/s allows %v", i, dz, dt, s.MaxZoomRatePerS, s.MaxZoomRatePerS*dt)
			}
			if dp := math.Abs(pitch[i] - pitch[i-1]); dp > s.MaxPitchRateDegPerS*dt+rateSlack {
				t.Fatalf("sample %d: pitch moved %v° in %v s, rate %v°/s allows %v", i, dp, dt, s.MaxPitchRateDegPerS, s.MaxPitchRateDegPerS*dt)
			}
		}
	})
}

func TestPropHysteresisHoldsSettledBand(t *testing.T) {
	// Around edge e = bands[k].below_kmh with hysteresis h > 0, once the band is k or k+1 it stays
	// there for any speeds in [e − h, e + h): going up from k needs e + h, going down from k+1 needs less
	// than e − h, and the other edges are further away still.
	rapid.Check(t, func(t *rapid.T) {
		s := genSet(t)
		if len(s.Bands) < 2 {
			s.Bands = append([]Band{{BelowKmh: Edge(20), Zoom: 17, PitchDeg: 40}}, s.Bands...)
			for i := 1; i < len(s.Bands)-1; i++ {
				*s.Bands[i].BelowKmh += 20
			}
		}
		if s.HysteresisKmh == 0 {
			s.HysteresisKmh = logUniform(t, 0.01, 30, "hysteresis_kmh (forced)")
		}
		k := rapid.IntRange(0, len(s.Bands)-2).Draw(t, "edge k")
		e, h := *s.Bands[k].BelowKmh, s.HysteresisKmh
		// Keep clear of the window's ends by a relative 1e-9, far more than the km/h ↔ m/s rounding.
		lo := math.Max(0, (e-h)*(1+1e-9))
		hi := (e + h) * (1 - 1e-9)
		// Start inside band k or k+1: the first sample picks the band by interval.
		startLo, startHi := lo, hi
		if k > 0 {
			startLo = math.Max(startLo, *s.Bands[k-1].BelowKmh*(1+1e-9))
		}
		if k+1 < len(s.Bands)-1 {
			startHi = math.Min(startHi, *s.Bands[k+1].BelowKmh*(1-1e-9))
		}
		if !(startLo < startHi) {
			t.Skip("no speed is both inside bands k..k+1 and the window")
		}
		st, err := s.Start(rapid.Float64Range(startLo, startHi).Draw(t, "start km/h")/3.6, 0, false)
		if err != nil {
			t.Fatal(err)
		}
		settled := st.Band()
		if settled != k && settled != k+1 {
			t.Fatalf("start band %d, want %d or %d", settled, k, k+1)
		}
		n := rapid.IntRange(1, 50).Draw(t, "noise samples")
		for i := 0; i < n; i++ {
			v := rapid.Float64Range(lo, hi).Draw(t, fmt.Sprintf("noise[%d] km/h", i))
			if err := st.Step(logUniform(t, 1e-3, 10, fmt.Sprintf("noise[%d] dt_s", i)), v/3.6, 0, false); err != nil {
				t.Fatal(err)
			}
			if st.Band() != settled {
				t.Fatalf("speed %v km/h within %v of edge %v moved the band %d → %d", v, h, e, settled, st.Band())
			}
		}
	})
}

func TestPropConvergesAtConstantSpeed(t *testing.T) {
	// After any history, holding one speed and one turn state for longer than the slowest full swing
	// (30 zoom levels at the zoom rate, 90° at the pitch rate) leaves zoom and pitch exactly on the
	// targets of the band the state holds, and there they stay.
	rapid.Check(t, func(t *rapid.T) {
		s := genSet(t)
		samples := genSamples(t)
		st, err := s.Start(samples[0].SpeedMps, 0, false)
		if err != nil {
			t.Fatal(err)
		}
		for i := 1; i < len(samples); i++ {
			if err := st.Step(samples[i].TS-samples[i-1].TS, samples[i].SpeedMps, 0, false); err != nil {
				t.Fatal(err)
			}
		}
		v := rapid.Float64Range(0, 70).Draw(t, "held speed_mps")
		turn := rapid.Bool().Draw(t, "held turn ahead")
		d := rapid.Float64Range(0, 2000).Draw(t, "held turn_dist_m")
		swing := math.Max(30/s.MaxZoomRatePerS, 90/s.MaxPitchRateDegPerS)
		steps := rapid.IntRange(1, 20).Draw(t, "steps to cover the swing")
		dt := swing/float64(steps) + 1e-9
		if err := st.Step(dt, v, d, turn); err != nil {
			t.Fatal(err)
		}
		band := st.Band()
		for i := 1; i < steps+2; i++ {
			if err := st.Step(dt, v, d, turn); err != nil {
				t.Fatal(err)
			}
			if st.Band() != band {
				t.Fatalf("band moved %d → %d at a constant speed", band, st.Band())
			}
		}
		wantZoom := s.Bands[band].Zoom
		if turn && d <= s.Turn.WithinM {
			wantZoom = math.Max(wantZoom, s.Turn.Zoom)
		}
		wantZoom = math.Min(math.Max(wantZoom, s.MinZoom), s.MaxZoom)
		if st.Zoom() != wantZoom || st.PitchDeg() != s.Bands[band].PitchDeg {
			t.Fatalf("after %v s held: zoom %v pitch %v, want %v %v exactly", dt*float64(steps+2), st.Zoom(), st.PitchDeg(), wantZoom, s.Bands[band].PitchDeg)
		}
	})
}
