package audit

import (
	"sync"
	"unicode/utf8"

	"github.com/valyala/fastjson"

	"github.com/viewspec/viewspec/internal/fastwire"
	"github.com/viewspec/viewspec/wire"
)

// decodeRecordFast reads the usual drive-log record without reflection:
// every key one of the record's, spelt exactly and given once, no null, the
// rules by name (rules_ref). It reports false for anything else, which the
// general decoder then reads, so that both give the same record (a test
// holds them together on the demo fleet and under fuzzing).
func decodeRecordFast(line []byte, w *wireRecord) bool {
	if !utf8.Valid(line) {
		return false
	}
	p := recordParsers.Get().(*fastjson.Parser)
	defer recordParsers.Put(p)
	v, err := p.ParseBytes(line)
	if err != nil {
		return false
	}
	o, err := v.Object()
	if err != nil {
		return false
	}
	var r wireRecord
	ok, seen := true, 0
	o.Visit(func(k []byte, v *fastjson.Value) {
		if !ok {
			return
		}
		var bit int
		switch string(k) {
		case "request_id":
			bit = 1 << 0
			r.RequestID, ok = fastString(v)
		case "tags":
			bit = 1 << 1
			r.Tags, ok = fastTags(v)
		case "device":
			bit = 1 << 2
			r.Device, ok = wire.FastDevice(v)
		case "rules_ref":
			bit = 1 << 3
			r.RulesRef, ok = fastString(v)
		case "cap":
			bit = 1 << 4
			r.Cap, ok = fastwire.Number(v)
		case "horizon_s":
			bit = 1 << 5
			r.HorizonS, ok = fastwire.Number(v)
		case "tick_s":
			bit = 1 << 6
			r.TickS, ok = fastwire.Number(v)
		case "bucket_edges_s":
			bit = 1 << 7
			r.BucketEdgesS, ok = fastwire.Numbers(v)
		case "trace":
			bit = 1 << 8
			r.Trace, ok = wire.FastFixes(v)
		case "route":
			bit = 1 << 9
			r.Route, ok = wire.FastRoute(v)
		case "candidates":
			bit = 1 << 10
			r.Candidates, ok = wire.FastMarkers(v)
		case "shown":
			bit = 1 << 11
			r.Shown, ok = fastShown(v)
		case "predicted":
			bit = 1 << 12
			r.Predicted, ok = fastPredicted(v)
		default:
			ok = false
		}
		if seen&bit != 0 {
			ok = false
		}
		seen |= bit
	})
	if ok {
		*w = r
	}
	return ok
}

var recordParsers = sync.Pool{New: func() any { return new(fastjson.Parser) }}

func fastString(v *fastjson.Value) (*string, bool) {
	s, ok := fastwire.String(v)
	return &s, ok
}

// fastTags reads the tags: an object of strings, each key once.
func fastTags(v *fastjson.Value) (map[string]string, bool) {
	o, err := v.Object()
	if err != nil {
		return nil, false
	}
	tags := make(map[string]string, o.Len())
	ok := true
	o.Visit(func(k []byte, v *fastjson.Value) {
		if !ok {
			return
		}
		key := string(k)
		for _, c := range k {
			if c < 0x20 {
				ok = false
				return
			}
		}
		if _, dup := tags[key]; dup {
			ok = false
			return
		}
		tags[key], ok = fastwire.String(v)
	})
	return tags, ok
}

// fastShown reads the display log.
func fastShown(v *fastjson.Value) ([]*wireShown, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*wireShown, len(arr))
	all := make([]wireShown, len(arr))
	for i, e := range arr {
		o, err := e.Object()
		if err != nil {
			return nil, false
		}
		s := &all[i]
		ok, seen := true, 0
		o.Visit(func(k []byte, v *fastjson.Value) {
			if !ok {
				return
			}
			var bit int
			switch string(k) {
			case "id":
				bit = 1
				s.ID, ok = fastString(v)
			case "first_shown_s":
				bit = 2
				s.FirstShownS, ok = fastwire.Number(v)
			case "shown_s":
				bit = 4
				s.ShownS, ok = fastwire.Number(v)
			case "intervals_s":
				bit = 8
				s.IntervalsS, ok = fastIntervals(v)
			default:
				ok = false
			}
			if seen&bit != 0 {
				ok = false
			}
			seen |= bit
		})
		if !ok {
			return nil, false
		}
		out[i] = s
	}
	return out, true
}

// fastIntervals reads an array of arrays of numbers.
func fastIntervals(v *fastjson.Value) ([][]*float64, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([][]*float64, len(arr))
	for i, e := range arr {
		var ok bool
		if out[i], ok = fastwire.Numbers(e); !ok {
			return nil, false
		}
	}
	return out, true
}

// fastPredicted reads the predictions.
func fastPredicted(v *fastjson.Value) ([]*wirePrediction, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*wirePrediction, len(arr))
	all := make([]wirePrediction, len(arr))
	for i, e := range arr {
		o, err := e.Object()
		if err != nil {
			return nil, false
		}
		p := &all[i]
		ok, seen := true, 0
		o.Visit(func(k []byte, v *fastjson.Value) {
			if !ok {
				return
			}
			var bit int
			switch string(k) {
			case "id":
				bit = 1
				p.ID, ok = fastString(v)
			case "p":
				bit = 2
				p.P, ok = fastwire.Numbers(v)
			default:
				ok = false
			}
			if seen&bit != 0 {
				ok = false
			}
			seen |= bit
		})
		if !ok {
			return nil, false
		}
		out[i] = p
	}
	return out, true
}
