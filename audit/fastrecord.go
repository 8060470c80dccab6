package audit

import (
	"sync"

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
	if !fastwire.Plain(line) {
		return false
	}
	p := recordParsers.Get().(*fastjson.Parser)
	defer recordParsers.Put(p)
	v, err := p.ParseBytes(line)
	if err != nil {
		return false
	}
	var r wireRecord
	ok := fastwire.Object(v, recordKeys, func(i int, v *fastjson.Value) bool {
		var ok bool
		switch recordKeys[i] {
		case "request_id":
			r.RequestID, ok = fastString(v)
		case "tags":
			r.Tags, ok = fastTags(v)
		case "device":
			r.Device, ok = wire.FastDevice(v)
		case "rules_ref":
			r.RulesRef, ok = fastString(v)
		case "cap":
			r.Cap, ok = fastwire.Number(v)
		case "horizon_s":
			r.HorizonS, ok = fastwire.Number(v)
		case "tick_s":
			r.TickS, ok = fastwire.Number(v)
		case "bucket_edges_s":
			r.BucketEdgesS, ok = fastwire.Numbers(v)
		case "trace":
			r.Trace, ok = wire.FastFixes(v)
		case "route":
			r.Route, ok = wire.FastRoute(v)
		case "candidates":
			r.Candidates, ok = wire.FastMarkers(v)
		case "shown":
			r.Shown, ok = fastShown(v)
		case "predicted":
			r.Predicted, ok = fastPredicted(v)
		}
		return ok
	})
	if ok {
		*w = r
	}
	return ok
}

var (
	recordKeys = []string{"request_id", "tags", "device", "rules_ref", "cap", "horizon_s", "tick_s",
		"bucket_edges_s", "trace", "route", "candidates", "shown", "predicted"}
	shownKeys     = []string{"id", "first_shown_s", "shown_s", "intervals_s"}
	predictedKeys = []string{"id", "p"}

	recordParsers = sync.Pool{New: func() any { return new(fastjson.Parser) }}
)

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

// fastArray reads an array of objects, each by read into its own T.
func fastArray[T any](v *fastjson.Value, read func(e *fastjson.Value, t *T) bool) ([]*T, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*T, len(arr))
	all := make([]T, len(arr))
	for i, e := range arr {
		if !read(e, &all[i]) {
			return nil, false
		}
		out[i] = &all[i]
	}
	return out, true
}

// fastShown reads the display log.
func fastShown(v *fastjson.Value) ([]*wireShown, bool) {
	var ptrs []*float64
	var vals []float64
	return fastArray(v, func(e *fastjson.Value, s *wireShown) bool {
		return fastwire.Object(e, shownKeys, func(i int, v *fastjson.Value) bool {
			var ok bool
			switch i {
			case 0:
				s.ID, ok = fastString(v)
			case 1:
				s.FirstShownS, ok = fastwire.Number(v)
			case 2:
				s.ShownS, ok = fastwire.Number(v)
			default:
				s.IntervalsS, ok = fastIntervals(v, &ptrs, &vals)
			}
			return ok
		})
	})
}

// fastIntervals reads an array of arrays of numbers, their numbers in the
// shared ptrs and vals (see fastwire.AppendNumbers).
func fastIntervals(v *fastjson.Value, ptrs *[]*float64, vals *[]float64) ([][]*float64, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([][]*float64, len(arr))
	for i, e := range arr {
		var ok bool
		if out[i], ok = fastwire.AppendNumbers(e, ptrs, vals); !ok {
			return nil, false
		}
	}
	return out, true
}

// fastPredicted reads the predictions.
func fastPredicted(v *fastjson.Value) ([]*wirePrediction, bool) {
	n := 0
	if arr, err := v.Array(); err == nil {
		n = 4 * len(arr)
	}
	ptrs, vals := make([]*float64, 0, n), make([]float64, 0, n)
	return fastArray(v, func(e *fastjson.Value, p *wirePrediction) bool {
		return fastwire.Object(e, predictedKeys, func(i int, v *fastjson.Value) bool {
			var ok bool
			if i == 0 {
				p.ID, ok = fastString(v)
			} else {
				p.P, ok = fastwire.AppendNumbers(v, &ptrs, &vals)
			}
			return ok
		})
	})
}
