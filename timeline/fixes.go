package timeline

import (
	"math"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/spec"
)

// Fix is one recorded position of a drive: where the user was TS seconds
// after the drive's start ([lon, lat] degrees).
type Fix struct {
	TS    float64
	Point orb.Point
}

// Replay returns the route and stops that drive exactly through fixes
// (SPEC §5, drives from recorded fixes): each move between two fixes is a
// segment at the speed the timestamps give, a repeated position is a stop
// for as long as it is repeated, the time before the first fix is a stop
// at it, and after the last fix the user stands there. Field names in
// errors start with path ("trace", "fixes").
func Replay(fixes []Fix, path string) (*routes.Route, []Stop, error) {
	if len(fixes) < 2 {
		return nil, nil, &spec.FieldError{Field: path, Reason: "want at least 2 fixes"}
	}
	pts := make([]orb.Point, 0, len(fixes))
	speeds := make([]float64, 0, len(fixes))
	var stops []Stop
	stop := func(at, until float64) {
		if until <= at {
			return
		}
		if n := len(stops); n > 0 && stops[n-1].AtS+stops[n-1].ForS == at {
			stops[n-1].ForS = until - stops[n-1].AtS
			return
		}
		stops = append(stops, Stop{AtS: at, ForS: until - at})
	}
	for i, f := range fixes {
		field := spec.Index(path, i)
		if err := spec.CheckLatLon(field, f.Point[1], f.Point[0]); err != nil {
			return nil, nil, err
		}
		if i == 0 {
			if !(f.TS >= 0) || f.TS > 1e9 {
				return nil, nil, spec.Out(field+".t_s", f.TS, "the first fix must be at or after the drive's start, within 1e9 s")
			}
			stop(0, f.TS)
			pts = append(pts, f.Point)
			continue
		}
		prev := fixes[i-1]
		if !(f.TS >= prev.TS) || f.TS > 1e9 {
			return nil, nil, spec.Out(field+".t_s", f.TS, "fix times must not decrease (the fix before is at "+spec.FormatNumber(prev.TS)+" s)")
		}
		at := pts[len(pts)-1] // where the user is: a stop keeps its first vertex
		distM := routes.GeodesicDistM(at, f.Point)
		if f.Point == at || distM == 0 {
			stop(prev.TS, f.TS)
			continue
		}
		speed := distM / (f.TS - prev.TS)
		if math.IsInf(speed, 0) {
			return nil, nil, spec.Out(field+".t_s", f.TS, "the position moves "+spec.FormatNumber(distM)+
				" m in "+spec.FormatNumber(f.TS-prev.TS)+" s")
		}
		speeds = append(speeds, speed)
		pts = append(pts, f.Point)
	}
	if len(pts) < 2 {
		return nil, nil, &spec.FieldError{Field: path, Reason: "the fixes never move: a drive that stands still has no heading"}
	}
	r, err := routes.New(pts, speeds)
	if err != nil {
		return nil, nil, &spec.FieldError{Field: path, Reason: err.Error()}
	}
	return r, stops, nil
}
