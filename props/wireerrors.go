package props

import (
	"errors"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"

	"github.com/viewspec/viewspec/wire"
)

// requiredFields are the top-level fields each op needs (SPEC §6), the
// first of each an object with required fields of its own.
var requiredFields = map[string][]string{
	"project":   {"camera", "points"},
	"unproject": {"camera", "pixels"},
	"footprint": {"camera"},
	"horizon":   {"camera"},
	"metrics":   {"user", "route", "markers"},
	"zoom":      {"rules", "samples"},
	"timeline":  {"device", "route", "rules", "markers"},
}

// nestedFields are a required number inside the first required object of
// each op.
var nestedFields = map[string]string{
	"camera": "zoom", "user": "lat", "rules": "max_zoom", "device": "width_px",
}

// wireErrors returns the family of requests of op that break the wire's
// rules one at a time (SPEC §6), each drawn from a valid request of the
// plain family: a required field absent, or of the wrong JSON type, at the
// top level or one level down; the op unknown, empty or absent. Every one
// is answered with an error code, and a case holds it as raw JSON: a
// wrong type cannot be written as a wire.Request.
func wireErrors(op string, plain Family) Family {
	return Family{Name: "wire_errors", Raw: func(rng Source) ([]byte, error) {
		req, err := plain.Draw(rng)
		if err != nil {
			return nil, err
		}
		req.Op = op
		b, err := wire.Marshal(req)
		if err != nil {
			return nil, err
		}
		var obj map[string]jsontext.Value
		if err := jsonv2.Unmarshal(b, &obj); err != nil {
			return nil, err
		}
		need := requiredFields[op]
		top := need[rng.IntN(len(need))]
		first := need[0]
		switch rng.IntN(7) {
		case 0: // missing_field
			delete(obj, top)
		case 1: // bad_type
			obj[top] = jsontext.Value(`"` + top + `"`)
		case 2: // unknown_op
			obj["op"] = jsontext.Value(`"teleport"`)
		case 3: // the empty op is an unknown one
			obj["op"] = jsontext.Value(`""`)
		case 4: // no op: missing_field
			delete(obj, "op")
		case 5, 6: // one level down: missing, or a string where a number belongs
			var inner map[string]jsontext.Value
			if err := jsonv2.Unmarshal(obj[first], &inner); err != nil {
				return nil, err
			}
			field := nestedFields[first]
			if _, ok := inner[field]; !ok {
				return nil, errors.New("no such nested field")
			}
			if rng.IntN(2) == 0 {
				delete(inner, field)
			} else {
				inner[field] = jsontext.Value(`"12"`)
			}
			v, err := jsonv2.Marshal(inner, jsonv2.Deterministic(true))
			if err != nil {
				return nil, err
			}
			obj[first] = v
		}
		return jsonv2.Marshal(obj, jsonv2.Deterministic(true))
	}}
}

// helloFamilies is the one family of op hello.
func helloFamilies() []Family {
	return []Family{{Name: "hello", Draw: func(Source) (*wire.Request, error) { return &wire.Request{}, nil }}}
}
