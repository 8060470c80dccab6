package rules

import (
	"math"
	"strconv"
)

// Sample is one input of the zoom evaluation (SPEC §3): the time, the speed, and the along-route
// distance to the next turn strictly ahead, or nil when there is none.
type Sample struct {
	TS        float64  `json:"t_s"`         // seconds, strictly increasing from sample to sample
	SpeedMps  float64  `json:"speed_mps"`   // metres per second, ≥ 0
	TurnDistM *float64 `json:"turn_dist_m"` // metres, ≥ 0; nil (JSON null) for no turn ahead
}

// Evaluate runs the rule set over samples and returns the zoom (zoom levels) and pitch (degrees) of the
// map at each, exactly as SPEC §3 defines them, through the same [State] the drive timeline uses. It
// checks the set ([Set.Validate]) and every sample: times finite and strictly increasing, speeds finite
// and ≥ 0, turn distances finite and ≥ 0; the error names the sample's index and value. No samples give
// two empty slices. A gap between two times too wide for a float64 counts as long enough to reach the
// target.
func (s *Set) Evaluate(samples []Sample) (zoom, pitchDeg []float64, err error) {
	if err := s.Validate(); err != nil {
		return nil, nil, err
	}
	zoom = make([]float64, len(samples))
	pitchDeg = make([]float64, len(samples))
	var st State
	for i := range samples {
		smp := &samples[i]
		turn, hasTurn := 0.0, smp.TurnDistM != nil
		if hasTurn {
			turn = *smp.TurnDistM
		}
		if e := checkTime(samples, i); e != nil {
			return nil, nil, e
		}
		if e := checkInput(smp.SpeedMps, turn, hasTurn); e != nil {
			e.Field = "samples[" + strconv.Itoa(i) + "]." + e.Field
			return nil, nil, e
		}
		if i == 0 {
			st = s.start(smp.SpeedMps, turn, hasTurn)
		} else {
			st.advance(smp.TS-samples[i-1].TS, smp.SpeedMps, turn, hasTurn)
		}
		zoom[i], pitchDeg[i] = st.zoom, st.pitch
	}
	return zoom, pitchDeg, nil
}

func checkTime(samples []Sample, i int) *Problem {
	t := samples[i].TS
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return &Problem{Kind: KindNotFinite, Field: "samples[" + strconv.Itoa(i) + "].t_s", Msg: notFiniteMsg(t)}
	}
	if i > 0 && !(t > samples[i-1].TS) {
		return &Problem{Kind: KindOrder, Field: "samples[" + strconv.Itoa(i) + "].t_s",
			Msg: fmtNum(t) + " is not after samples[" + strconv.Itoa(i-1) + "].t_s " + fmtNum(samples[i-1].TS) +
				": times must increase strictly"}
	}
	return nil
}

// checkInput checks one sample's speed and turn distance; it allocates only when there is a problem.
func checkInput(speedMps, turnDistM float64, hasTurn bool) *Problem {
	if math.IsNaN(speedMps) || math.IsInf(speedMps, 0) {
		return &Problem{Kind: KindNotFinite, Field: "speed_mps", Msg: notFiniteMsg(speedMps)}
	}
	if speedMps < 0 {
		return &Problem{Kind: KindRange, Field: "speed_mps", Msg: rangeMsg(speedMps, nonNegative)}
	}
	if !hasTurn {
		return nil
	}
	if math.IsNaN(turnDistM) || math.IsInf(turnDistM, 0) {
		return &Problem{Kind: KindNotFinite, Field: "turn_dist_m", Msg: notFiniteMsg(turnDistM)}
	}
	if turnDistM < 0 {
		return &Problem{Kind: KindRange, Field: "turn_dist_m", Msg: rangeMsg(turnDistM, nonNegative)}
	}
	return nil
}

// State is the zoom evaluation as a stream, for the drive timeline: the current band, zoom and pitch.
// [Set.Start] makes one from the first sample and [State.Step] advances it by one more; neither
// allocates on success. A State keeps a pointer to its Set, which must not change while the State is in
// use. The zero State is not started: Step on it is an error.
type State struct {
	set   *Set
	band  int
	zoom  float64
	pitch float64
}

// Start checks the set ([Set.Validate]) and the first sample (speed in m/s, finite, ≥ 0; when hasTurn,
// the distance to the next turn in metres, finite, ≥ 0; turnDistM is ignored otherwise) and returns the
// state at that sample: the band whose interval holds the speed (no hysteresis), and zoom and pitch at
// their targets.
func (s *Set) Start(speedMps, turnDistM float64, hasTurn bool) (State, error) {
	if err := s.Validate(); err != nil {
		return State{}, err
	}
	if e := checkInput(speedMps, turnDistM, hasTurn); e != nil {
		return State{}, e
	}
	return s.start(speedMps, turnDistM, hasTurn), nil
}

func (s *Set) start(speedMps, turnDistM float64, hasTurn bool) State {
	kmh := speedMps * 3.6
	last := len(s.Bands) - 1
	b := last
	for i := 0; i < last; i++ {
		if kmh < *s.Bands[i].BelowKmh {
			b = i
			break
		}
	}
	z, p := s.targets(b, turnDistM, hasTurn)
	return State{set: s, band: b, zoom: z, pitch: p}
}

// Step advances the state by dtS seconds (finite, > 0) to a sample with the given speed (m/s, finite,
// ≥ 0) and turn distance (metres, finite, ≥ 0, used only when hasTurn): the band moves by the
// hysteresis rule, then zoom and pitch move toward their targets by at most their rates × dtS. On an
// error the state is unchanged.
func (st *State) Step(dtS, speedMps, turnDistM float64, hasTurn bool) error {
	if st.set == nil {
		return &Problem{Kind: KindNotStarted, Msg: "Step on a State that Set.Start did not make"}
	}
	if math.IsNaN(dtS) || math.IsInf(dtS, 0) {
		return &Problem{Kind: KindNotFinite, Field: "dt_s", Msg: notFiniteMsg(dtS)}
	}
	if !(dtS > 0) {
		return &Problem{Kind: KindRange, Field: "dt_s", Msg: rangeMsg(dtS, positive)}
	}
	if e := checkInput(speedMps, turnDistM, hasTurn); e != nil {
		return e
	}
	st.advance(dtS, speedMps, turnDistM, hasTurn)
	return nil
}

// advance is Step without the checks; dtS may be +Inf (the target is reached).
func (st *State) advance(dtS, speedMps, turnDistM float64, hasTurn bool) {
	s := st.set
	kmh := speedMps * 3.6 // km/h = m/s × 3.6, one rounding, as every implementation must compute it
	b, last, h := st.band, len(s.Bands)-1, s.HysteresisKmh
	for b < last && kmh >= *s.Bands[b].BelowKmh+h {
		b++
	}
	for b > 0 && kmh < *s.Bands[b-1].BelowKmh-h {
		b--
	}
	st.band = b
	z, p := s.targets(b, turnDistM, hasTurn)
	st.zoom = approach(st.zoom, z, s.MaxZoomRatePerS*dtS)
	st.pitch = approach(st.pitch, p, s.MaxPitchRateDegPerS*dtS)
}

// targets returns band b's target zoom (raised to turn.zoom within turn.within_m of a turn, then
// clamped to [min_zoom, max_zoom]) and target pitch.
func (s *Set) targets(b int, turnDistM float64, hasTurn bool) (zoom, pitchDeg float64) {
	zoom = s.Bands[b].Zoom
	if hasTurn && turnDistM <= s.Turn.WithinM {
		zoom = max(zoom, s.Turn.Zoom)
	}
	return min(max(zoom, s.MinZoom), s.MaxZoom), s.Bands[b].PitchDeg
}

// approach moves cur toward target by at most maxStep (≥ 0, possibly +Inf). SPEC §3 writes this as
// cur += clamp(target − cur, ±maxStep); when the target is within reach the result is the target itself,
// where the literal sum could land one unit in the last place beside it, and a full step never passes the
// target. Either way the two readings differ by at most that last-place unit.
func approach(cur, target, maxStep float64) float64 {
	d := target - cur
	switch {
	case d > maxStep:
		return min(cur+maxStep, target)
	case d < -maxStep:
		return max(cur-maxStep, target)
	}
	return target
}

// Zoom returns the map's zoom at the current sample, in zoom levels within [min_zoom, max_zoom].
func (st *State) Zoom() float64 { return st.zoom }

// PitchDeg returns the camera tilt at the current sample, in degrees from straight down, in [0, 90).
func (st *State) PitchDeg() float64 { return st.pitch }

// Band returns the index of the current speed band in the set's Bands.
func (st *State) Band() int { return st.band }
