package geofile

import (
	"bytes"
	"encoding/json"
	"reflect"
	"strings"
	"testing"
)

// asAny turns the tree into what encoding/json makes of the same text
// with UseNumber, to compare the two; duplicate keys keep the last value,
// as encoding/json does.
func (v *jsonValue) asAny(data []byte) any {
	switch v.kind {
	case jsonNull:
		return nil
	case jsonBool:
		return string(data[v.start:v.end]) == "true"
	case jsonNumber:
		return json.Number(v.text)
	case jsonString:
		return v.text
	case jsonArray:
		out := make([]any, len(v.elems))
		for i := range v.elems {
			out[i] = v.elems[i].asAny(data)
		}
		return out
	}
	out := map[string]any{}
	for i := range v.members {
		out[v.members[i].key] = v.members[i].val.asAny(data)
	}
	return out
}

// checkOffsets checks that every value's offsets hold exactly its text:
// what encoding/json decodes from data[start:end] is the value itself.
func checkOffsets(t *testing.T, data []byte, v *jsonValue) {
	t.Helper()
	raw := data[v.start:v.end]
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	var got any
	if err := dec.Decode(&got); err != nil || dec.InputOffset() != int64(len(raw)) || !reflect.DeepEqual(got, v.asAny(data)) {
		t.Fatalf("parseJSON(%q): value at [%d, %d) = %q, which does not decode to the value alone (%v)", data, v.start, v.end, raw, err)
	}
	for i := range v.elems {
		checkOffsets(t, data, &v.elems[i])
	}
	for i := range v.members {
		checkOffsets(t, data, &v.members[i].val)
	}
}

// FuzzJSONTree: on valid JSON the tree's scanner, which trusts the
// grammar checked by json.Valid, reads what encoding/json reads, and
// each value's offsets span exactly its text; on invalid JSON it is an
// error at an offset within the data.
func FuzzJSONTree(f *testing.F) {
	for _, s := range []string{
		`{"type":"LineString","coordinates":[[0,0],[1.5e-3,-2E+2]]}`,
		` [ true , false , null , "a\"b\\c\u00e9\ud83d\ude00" , -0.0 , {} , [] ] `,
		"{\"k\":\"\xff\",\"k\":2}",
		`{"a":{"b":[{"c":[1,[2,[3]]]}]}}`,
		`"only a string"`,
		`12`,
		`{"a":1,}`,
		`[1 2]`,
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		data := []byte(s)
		v, err := parseJSON(data)
		if !json.Valid(data) {
			se, ok := err.(*jsonSyntaxError)
			if !ok || se.off < 0 || se.off > int64(len(data)) {
				t.Fatalf("parseJSON(%q) = %v, want a syntax error within the data", s, err)
			}
			return
		}
		if err != nil {
			if strings.Contains(err.Error(), "nested deeper") {
				return
			}
			t.Fatalf("parseJSON(%q) = %v, want no error on valid JSON", s, err)
		}
		dec := json.NewDecoder(bytes.NewReader(data))
		dec.UseNumber()
		var want any
		if err := dec.Decode(&want); err != nil {
			t.Fatalf("encoding/json on valid %q: %v", s, err)
		}
		if got := v.asAny(data); !reflect.DeepEqual(got, want) {
			t.Fatalf("parseJSON(%q) = %#v, want %#v (encoding/json)", s, got, want)
		}
		checkOffsets(t, data, &v)
	})
}
