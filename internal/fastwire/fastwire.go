// Package fastwire holds the pieces of viewspec's hand-written readers of
// the wire's bulk (camera requests, drive-log records): values taken from a
// parsed line without reflection, each exactly as the general decoder
// (package wire) reads it, or refused, so that the caller falls back to the
// general decoder. Numbers follow the JSON grammar (RFC 8259 §6) and are
// read by strconv.ParseFloat, correctly rounded; strings are taken only
// when they hold no control character.
package fastwire

import (
	"bytes"
	"strconv"
	"unicode/utf8"

	"github.com/valyala/fastjson"
)

// Plain reports whether a line is one the hand-written readers may take:
// valid UTF-8 without a backslash. The parser they use is laxer than the
// general decoder about escapes (it keeps an invalid one, a lone
// surrogate), and the usual line has none, so any escape sends the whole
// line to the general decoder.
func Plain(line []byte) bool {
	return utf8.Valid(line) && bytes.IndexByte(line, '\\') < 0
}

// Number returns a finite JSON number as the general decoder reads it.
func Number(v *fastjson.Value) (*float64, bool) {
	f, ok := Float(v)
	if !ok {
		return nil, false
	}
	return &f, true
}

// Float is Number without the pointer.
func Float(v *fastjson.Value) (float64, bool) {
	if v.Type() != fastjson.TypeNumber {
		return 0, false
	}
	s := v.String()
	if !IsNumber(s) {
		return 0, false
	}
	f, err := strconv.ParseFloat(s, 64)
	return f, err == nil
}

// IsNumber reports whether s is a number by the JSON grammar:
// -?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?.
func IsNumber(s string) bool {
	i := 0
	if i < len(s) && s[i] == '-' {
		i++
	}
	digits := func() int {
		n := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			n++
		}
		return n
	}
	switch {
	case i < len(s) && s[i] == '0':
		i++
	case digits() == 0:
		return false
	}
	if i < len(s) && s[i] == '.' {
		i++
		if digits() == 0 {
			return false
		}
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		if digits() == 0 {
			return false
		}
	}
	return i == len(s)
}

// String returns a JSON string's text when it holds no control character
// (which the general decoder refuses raw); the caller must have checked
// the line with Plain.
func String(v *fastjson.Value) (string, bool) {
	if v.Type() != fastjson.TypeString {
		return "", false
	}
	b := v.GetStringBytes()
	for _, c := range b {
		if c < 0x20 {
			return "", false
		}
	}
	return string(b), true
}

// Object calls fn with the index in names of each key of the object v
// and its value, in the line's order; it reports false when v is not an
// object, a key is not among names (spelt exactly) or repeats, or fn
// reports false (at most 64 names).
func Object(v *fastjson.Value, names []string, fn func(i int, v *fastjson.Value) bool) bool {
	o, err := v.Object()
	if err != nil {
		return false
	}
	ok, seen := true, uint64(0)
	o.Visit(func(k []byte, v *fastjson.Value) {
		if !ok {
			return
		}
		i := 0
		for i < len(names) && names[i] != string(k) {
			i++
		}
		if i == len(names) || seen&(1<<i) != 0 {
			ok = false
			return
		}
		seen |= 1 << i
		ok = fn(i, v)
	})
	return ok
}

// Fields sets the numbers of an object whose keys are all among names,
// each given once; dst[i] receives names[i], pointing into store (as long
// as names), so that an object costs one allocation or none.
func Fields(v *fastjson.Value, names []string, dst []**float64, store []float64) bool {
	return Object(v, names, func(i int, v *fastjson.Value) bool {
		var ok bool
		store[i], ok = Float(v)
		*dst[i] = &store[i]
		return ok
	})
}

// AppendNumbers appends an array of finite numbers to vals and pointers to
// them to ptrs, and returns the pointers it appended (a slice of ptrs);
// many small arrays so share two allocations.
func AppendNumbers(v *fastjson.Value, ptrs *[]*float64, vals *[]float64) ([]*float64, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	start := len(*ptrs)
	for _, e := range arr {
		f, ok := Float(e)
		if !ok {
			return nil, false
		}
		if len(*vals) == cap(*vals) {
			// A new backing array; the pointers into the old one stay
			// valid, the old array alive behind them.
			*vals = make([]float64, 0, 2*cap(*vals)+4)
		}
		*vals = append(*vals, f)
		*ptrs = append(*ptrs, &(*vals)[len(*vals)-1])
	}
	return (*ptrs)[start:len(*ptrs):len(*ptrs)], true
}

// Numbers returns an array of finite numbers.
func Numbers(v *fastjson.Value) ([]*float64, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*float64, len(arr))
	store := make([]float64, len(arr))
	for i, e := range arr {
		var ok bool
		if store[i], ok = Float(e); !ok {
			return nil, false
		}
		out[i] = &store[i]
	}
	return out, true
}
