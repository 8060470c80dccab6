package geofile

import (
	"encoding/json"
	"errors"
	"fmt"
	"unicode/utf8"
)

// jsonKind is the type of a JSON value as written.
type jsonKind int8

const (
	jsonNull jsonKind = iota
	jsonBool
	jsonNumber
	jsonString
	jsonArray
	jsonObject
)

// article names a kind the way a message says what it got: "a string".
func (k jsonKind) article() string {
	return [...]string{"null", "true or false", "a number", "a string", "an array", "an object"}[k]
}

// jsonValue is one JSON value kept as written, with the byte offsets where
// it starts and ends, so that an error can give its line and quote it.
// Numbers keep their text: a reader decides whether it is a usable double
// (1e400 is valid JSON and no double). GeoJSON is read from this tree and
// not from a decoder into Go values, which would turn a null or a missing
// coordinate into 0 and lose where each value was.
type jsonValue struct {
	start, end int64 // byte offsets in the file: the value's first byte and one past its last
	kind       jsonKind
	text       string       // a number's text or a string's value
	elems      []jsonValue  // an array's elements
	members    []jsonMember // an object's members in file order
}

type jsonMember struct {
	key string
	val jsonValue
}

// maxJSONDepth bounds the nesting of arrays and objects: GeoJSON needs 6
// levels and properties a few more; a deeper file is refused rather than
// read recursively that deep.
const maxJSONDepth = 256

// jsonSyntaxError is malformed JSON at byte offset off.
type jsonSyntaxError struct {
	off int64
	msg string
}

func (e *jsonSyntaxError) Error() string { return e.msg }

// parseJSON reads data, which must hold exactly one JSON value (RFC 8259).
// encoding/json checks the syntax first, and says where it is broken; the
// tree is then built by a scanner that can trust the grammar, in one pass
// and with an allocation per array, object and string, not per token.
func parseJSON(data []byte) (jsonValue, error) {
	if !json.Valid(data) {
		var se *json.SyntaxError
		if err := json.Unmarshal(data, new(struct{})); errors.As(err, &se) {
			return jsonValue{}, &jsonSyntaxError{se.Offset, se.Error()}
		}
		return jsonValue{}, &jsonSyntaxError{int64(len(data)), "not valid JSON"}
	}
	s := jsonScanner{data: data}
	return s.value(0)
}

// jsonScanner builds the tree of valid JSON. It never indexes past the
// data: should the grammar not hold after all, it reports an error.
type jsonScanner struct {
	data []byte
	off  int
	// The elements and members of the open containers, innermost last.
	elemStack   []jsonValue
	memberStack []jsonMember
}

var errJSONScan = errors.New("unexpected text")

// peek skips white space and returns the next byte, or 0 at the end.
func (s *jsonScanner) peek() byte {
	for s.off < len(s.data) {
		switch c := s.data[s.off]; c {
		case ' ', '\t', '\r', '\n':
			s.off++
		default:
			return c
		}
	}
	return 0
}

// expect consumes the byte c after white space.
func (s *jsonScanner) expect(c byte) error {
	if s.peek() != c {
		return &jsonSyntaxError{int64(s.off), fmt.Sprintf("want %q", c)}
	}
	s.off++
	return nil
}

func (s *jsonScanner) value(depth int) (jsonValue, error) {
	c := s.peek()
	v := jsonValue{start: int64(s.off)}
	var err error
	switch {
	case c == '[' || c == '{':
		if depth >= maxJSONDepth {
			return v, &jsonSyntaxError{v.start, fmt.Sprintf("nested deeper than %d arrays and objects", maxJSONDepth)}
		}
		v.kind, v.elems, v.members, err = s.container(depth)
	case c == '"':
		v.kind = jsonString
		v.text, err = s.str()
	case c == 't': // true
		v.kind = jsonBool
		s.off += 4
	case c == 'f': // false
		v.kind = jsonBool
		s.off += 5
	case c == 'n': // null
		v.kind = jsonNull
		s.off += 4
	case c == '-' || c >= '0' && c <= '9':
		v.kind = jsonNumber
		for s.off < len(s.data) && isNumberByte(s.data[s.off]) {
			s.off++
		}
		v.text = string(s.data[v.start:s.off])
	default:
		err = errJSONScan
	}
	var se *jsonSyntaxError
	switch {
	case errors.As(err, &se):
		return v, se
	case err != nil || s.off > len(s.data):
		return v, &jsonSyntaxError{v.start, "unexpected text"}
	}
	v.end = int64(s.off)
	return v, nil
}

func isNumberByte(c byte) bool {
	return c >= '0' && c <= '9' || c == '-' || c == '+' || c == '.' || c == 'e' || c == 'E'
}

// container reads the array or object starting at the scanner: its kind
// and its elements or members, each slice allocated once at its size
// (they collect on the scanner's stacks first).
func (s *jsonScanner) container(depth int) (jsonKind, []jsonValue, []jsonMember, error) {
	open := s.data[s.off]
	s.off++
	kind, closing := jsonArray, byte(']')
	if open == '{' {
		kind, closing = jsonObject, '}'
	}
	elemBase, memberBase := len(s.elemStack), len(s.memberStack)
	defer func() {
		s.elemStack, s.memberStack = s.elemStack[:elemBase], s.memberStack[:memberBase]
	}()
	if s.peek() == closing {
		s.off++
		return kind, nil, nil, nil
	}
	for {
		var key string
		if kind == jsonObject {
			if s.peek() != '"' {
				return kind, nil, nil, errJSONScan
			}
			k, err := s.str()
			if err != nil {
				return kind, nil, nil, err
			}
			if err := s.expect(':'); err != nil {
				return kind, nil, nil, err
			}
			key = k
		}
		e, err := s.value(depth + 1)
		if err != nil {
			return kind, nil, nil, err
		}
		if kind == jsonObject {
			s.memberStack = append(s.memberStack, jsonMember{key, e})
		} else {
			s.elemStack = append(s.elemStack, e)
		}
		switch s.peek() {
		case ',':
			s.off++
		case closing:
			s.off++
			if kind == jsonObject {
				return kind, nil, append([]jsonMember(nil), s.memberStack[memberBase:]...), nil
			}
			return kind, append([]jsonValue(nil), s.elemStack[elemBase:]...), nil, nil
		default:
			return kind, nil, nil, errJSONScan
		}
	}
}

// str reads the string starting at the scanner (at its opening quote) and
// returns its value: the bytes between the quotes when they need no
// decoding, else what encoding/json makes of them (escapes decoded,
// invalid UTF-8 replaced by U+FFFD).
func (s *jsonScanner) str() (string, error) {
	i := s.off + 1
	plain := true
	for ; i < len(s.data) && s.data[i] != '"'; i++ {
		if s.data[i] == '\\' {
			plain = false
			i++
		}
	}
	if i >= len(s.data) {
		return "", errJSONScan
	}
	raw := s.data[s.off : i+1]
	s.off = i + 1
	if plain && utf8.Valid(raw) {
		return string(raw[1 : len(raw)-1]), nil
	}
	var out string
	if err := json.Unmarshal(raw, &out); err != nil {
		return "", errJSONScan
	}
	return out, nil
}
