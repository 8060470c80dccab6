package wire

import (
	"encoding/json"
	"errors"
	"strconv"
	"strings"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"
)

// opFields lists, per op, the top-level request fields it reads. A field
// an op does not read is ignored whatever its type (SPEC §6: readers ignore
// fields they do not know).
var opFields = map[string][]string{
	"hello":     {},
	"project":   {"camera", "points"},
	"unproject": {"camera", "pixels"},
	"footprint": {"camera"},
	"horizon":   {"camera"},
	"metrics":   {"route", "user", "markers", "camera"},
	"zoom":      {"rules", "samples"},
	"timeline": {"route", "start_along_m", "user", "device", "rules", "markers",
		"horizon_s", "tick_s", "cap", "bucket_edges_s", "trace", "fixes"},
}

// requestOpts decode requests as SPEC §6 reads them: keys matched exactly
// (a "Lat" is not a "lat"), unknown keys ignored, and, like most readers,
// the last of a repeated key taken.
var requestOpts = jsonv2.JoinOptions(jsonv2.DefaultOptionsV2(), jsontext.AllowDuplicateNames(true))

// DecodeRequest reads one request line. A field the request's op does not
// read is ignored even when its type is wrong, and an op that is not one
// of the wire's reads no field at all (SPEC §6). When the line is valid
// JSON but a field has the wrong type, the error is returned and req still
// holds the line's id, so that the error answer echoes it.
func DecodeRequest(line []byte, req *Request) error {
	if decodeCameraFast(line, req) {
		return nil
	}
	err := decodeRequest(line, req)
	if err != nil && len(req.ID) == 0 {
		req.ID = peekID(line)
	}
	if err == nil && req.Op == "" {
		req.opEmpty = hasEmptyOp(line)
	}
	return err
}

func decodeRequest(line []byte, req *Request) error {
	for range 16 {
		*req = Request{}
		err := jsonv2.Unmarshal(line, req, requestOpts)
		var se *jsonv2.SemanticError
		if err == nil || !errors.As(err, &se) {
			return err
		}
		top := topField(se.JSONPointer)
		if top == "" || top == "op" || top == "id" {
			return err
		}
		// The op may not be read yet when the error came first.
		op := req.Op
		if op == "" {
			op = peekOp(line)
		}
		if used, known := opFields[op]; known && containsStr(used, top) {
			return err
		}
		// The bad field is one this op does not read: hide it and decode
		// again.
		line = hideKey(line, top)
	}
	return jsonv2.Unmarshal(line, req, requestOpts)
}

// OpGiven reports whether the request named an op, even the empty string
// (which is an op no implementation speaks, not a missing one).
func (req *Request) OpGiven() bool { return req.Op != "" || req.opEmpty }

// peekID returns the id of a line, when it is a JSON object with one.
func peekID(line []byte) json.RawMessage {
	var head struct {
		ID jsontext.Value `json:"id"`
	}
	if jsonv2.Unmarshal(line, &head, requestOpts) != nil || len(head.ID) == 0 {
		return nil
	}
	return json.RawMessage(head.ID)
}

// hasEmptyOp reports whether the line's op is the empty string, not absent
// or null.
func hasEmptyOp(line []byte) bool {
	var head struct {
		Op *string `json:"op"`
	}
	return jsonv2.Unmarshal(line, &head, requestOpts) == nil && head.Op != nil
}

// topField returns the first token of a JSON pointer: the top-level field.
func topField(p jsontext.Pointer) string {
	for tok := range p.Tokens() {
		return tok
	}
	return ""
}

// pointerPath writes a JSON pointer as a field path: "camera.device.width_px",
// "points[2].lat".
func pointerPath(p jsontext.Pointer) string {
	var b strings.Builder
	for tok := range p.Tokens() {
		if n, err := strconv.Atoi(tok); err == nil && n >= 0 && b.Len() > 0 {
			b.WriteString("[" + tok + "]")
			continue
		}
		if b.Len() > 0 {
			b.WriteByte('.')
		}
		b.WriteString(tok)
	}
	return b.String()
}

// peekOp reads just the op of a line.
func peekOp(line []byte) string {
	var head struct {
		Op string `json:"op"`
	}
	jsonv2.Unmarshal(line, &head, requestOpts)
	return head.Op
}

func containsStr(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// hideKey overwrites the top-level key name in line with underscores.
func hideKey(line []byte, name string) []byte {
	out := append([]byte(nil), line...)
	depth := 0
	inString, escaped := false, false
	start := 0
	for i := 0; i < len(out); i++ {
		c := out[i]
		if inString {
			switch {
			case escaped:
				escaped = false
			case c == '\\':
				escaped = true
			case c == '"':
				inString = false
				if depth == 1 && string(out[start+1:i]) == name && isKey(out, i+1) {
					for j := start + 1; j < i; j++ {
						out[j] = '_'
					}
				}
			}
			continue
		}
		switch c {
		case '"':
			inString, start = true, i
		case '{', '[':
			depth++
		case '}', ']':
			depth--
		}
	}
	return out
}

// isKey reports whether the string that ended just before i is an object
// key: the next non-space byte is a colon.
func isKey(line []byte, i int) bool {
	for ; i < len(line); i++ {
		switch line[i] {
		case ' ', '\t', '\r', '\n':
			continue
		case ':':
			return true
		}
		return false
	}
	return false
}

// Unmarshal decodes one JSON document into v as requests are decoded:
// keys matched exactly, unknown keys ignored. Files that hold wire objects
// (a camera, a device) are read with it, so that they mean what the same
// object means on the wire.
func Unmarshal(data []byte, v any) error { return jsonv2.Unmarshal(data, v, requestOpts) }

// NearKeys returns the keys of the JSON object data that look like field
// but are not it: the same letters in another case, or the field without
// its unit suffix ("heading" for "heading_deg"), for a hint in a message.
func NearKeys(data []byte, field string) []string {
	var obj map[string]jsontext.Value
	if jsonv2.Unmarshal(data, &obj, requestOpts) != nil {
		return nil
	}
	stem := field
	if i := strings.LastIndexByte(field, '_'); i > 0 {
		stem = field[:i]
	}
	var near []string
	for k := range obj {
		if k != field && (strings.EqualFold(k, field) || strings.EqualFold(k, stem)) {
			near = append(near, k)
		}
	}
	return near
}
