package reference

import (
	"errors"

	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// evalZoom answers op zoom (SPEC §3): the zoom and pitch the rule set gives
// at each sample.
func evalZoom(req *wire.Request, m *wire.Margins) (any, error) {
	rs, err := req.Rules.Value("rules")
	if err != nil {
		return nil, err
	}
	if req.Samples == nil {
		return nil, spec.Absent("samples")
	}
	samples := make([]rules.Sample, len(req.Samples))
	for i, sw := range req.Samples {
		switch {
		case sw == nil:
			return nil, spec.Absent(spec.Index("samples", i))
		case sw.TS == nil:
			return nil, spec.Absent(spec.Index("samples", i) + ".t_s")
		case sw.SpeedMps == nil:
			return nil, spec.Absent(spec.Index("samples", i) + ".speed_mps")
		}
		samples[i] = rules.Sample{TS: *sw.TS, SpeedMps: *sw.SpeedMps, TurnDistM: sw.TurnDistM}
	}
	zoom, pitch, err := rs.Evaluate(samples)
	if err != nil {
		var p *rules.Problem
		if errors.As(err, &p) {
			return nil, &spec.FieldError{Field: p.Field, Reason: p.Msg}
		}
		return nil, &spec.FieldError{Field: "samples", Reason: err.Error()}
	}
	return &wire.ZoomAnswer{Head: wire.Head{ID: req.ID}, Zoom: zoom, PitchDeg: pitch}, nil
}
