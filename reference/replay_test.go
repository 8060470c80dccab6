package reference_test

import (
	"bufio"
	"bytes"
	"os"
	"strconv"
	"testing"

	"github.com/go-json-experiment/json/jsontext"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/reference"
)

// marginKeys are the keys the reference adds beside its answers; a corpus
// case keeps them apart, under margins.
var marginKeys = map[string]bool{"margin_px": true, "side_margin_m": true, "bucket_margin_s": true, "first_shown_margin_px": true, "turn_margin_deg": true}

// stripMargins returns the answer line with the reference's margins removed,
// compact, keys in their order: what a corpus case keeps as expect.
func stripMargins(t *testing.T, line []byte) []byte {
	t.Helper()
	dec := jsontext.NewDecoder(bytes.NewReader(line))
	var out bytes.Buffer
	enc := jsontext.NewEncoder(&out)
	skipNext := false
	for {
		tok, err := dec.ReadToken()
		if err != nil {
			break
		}
		if skipNext {
			skipNext = false
			if k := tok.Kind(); k == '{' || k == '[' {
				dec.SkipValue()
			}
			continue
		}
		// An object key: its name is a string in key position.
		if k, n := dec.StackIndex(dec.StackDepth()); tok.Kind() == '"' && k == '{' && n%2 == 1 && marginKeys[tok.String()] {
			skipNext = true
			continue
		}
		if err := enc.WriteToken(tok); err != nil {
			t.Fatalf("re-encoding %s: %v", line, err)
		}
	}
	return bytes.TrimSpace(out.Bytes())
}

// Replaying the default corpus through the wire gives, for every case, the
// very bytes the corpus keeps: the answer (margins aside, and an error
// message without its line number) is expect, byte for byte. The corpus was made before the packages were split, so this
// pins the wire's answers across any change of layout.
func TestWireReplaysDefaultCorpus(t *testing.T) {
	f, err := os.Open("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cases, err := corpus.ReadCorpus("default.jsonl", bufio.NewReader(f))
	if err != nil {
		t.Fatal(err)
	}
	if len(cases) < 3000 {
		t.Fatalf("read %d cases, want the 3,008 of the default corpus", len(cases))
	}
	for i, c := range cases {
		got := stripMargins(t, reference.AnswerLine(c.Request, i+1))
		// An error's message names the stream's line; the corpus keeps it
		// without.
		got = bytes.Replace(got, []byte(`"message":"line `+strconv.Itoa(i+1)+`: `), []byte(`"message":"`), 1)
		if !bytes.Equal(got, c.Expect) {
			t.Fatalf("case %s: the wire answers\n%s\nthe corpus expects\n%s", c.ID, got, c.Expect)
		}
	}
}
