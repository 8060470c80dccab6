package corpus_test

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/props"
)

// The shipped default corpus is exactly what its recorded command makes
// (fixtures/corpus/README.md), and the reference still gives every
// expectation in it.
func TestDefaultCorpusReproduces(t *testing.T) {
	want, err := os.ReadFile("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	var got bytes.Buffer
	if _, err := corpus.Generate(&got, 1, 3000, nil); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got.Bytes(), want) {
		t.Fatalf("fixtures gen --seed 1 --count 3000 no longer makes corpus/default.jsonl (%d bytes now, %d shipped); regenerate it as its README says", got.Len(), len(want))
	}
	problems, n, err := check.ValidateCorpus(bytes.NewReader(want))
	if err != nil || len(problems) > 0 {
		t.Fatalf("validate: %v, %d problems of %d cases, first %+v", err, len(problems), n, problems)
	}
}

// Generation depends on the seed, and a case does not depend on which other
// ops were asked for.
func TestGenerateDeterministic(t *testing.T) {
	gen := func(seed uint64, only map[string]bool) string {
		var b bytes.Buffer
		if _, err := corpus.Generate(&b, seed, 200, only); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	a, b := gen(5, nil), gen(5, nil)
	if a != b {
		t.Fatal("same seed, different bytes")
	}
	if gen(6, nil) == a {
		t.Fatal("another seed, same bytes")
	}
	cam := gen(5, map[string]bool{"footprint": true})
	for _, line := range strings.Split(strings.TrimSpace(cam), "\n") {
		var c corpus.Case
		json.Unmarshal([]byte(line), &c)
		if c.Op != "footprint" {
			t.Fatalf("case %s of op %s in a footprint-only corpus", c.ID, c.Op)
		}
	}
}

// Every family appears in a corpus of any size.
func TestGenerateCoversFamilies(t *testing.T) {
	var b bytes.Buffer
	if _, err := corpus.Generate(&b, 9, 10, nil); err != nil {
		t.Fatal(err)
	}
	cases, err := corpus.ReadCorpus("gen", &b)
	if err != nil {
		t.Fatal(err)
	}
	st := corpus.StatsOf(cases)
	for _, f := range props.Families() {
		if st.ByFamily[f] == 0 {
			t.Errorf("family %s is missing", f)
		}
	}
}

// FuzzReadCorpus: the corpus and answer readers never panic; corpus errors
// name the file and line.
func FuzzReadCorpus(f *testing.F) {
	f.Add(`{"id":"a","family":"f","op":"project","request":{"op":"project","id":"a"},"expect":{"screen":[]},"margins":{}}`)
	f.Add("{\"id\":\"a\"}\n{\"id\":\"a\"}")
	f.Add(`{"id":"x","screen":[{"x":1,"y":2,"depth":3,"in_view":true}]}`)
	f.Add(`not json`)
	f.Fuzz(func(t *testing.T, data string) {
		if _, err := corpus.ReadCorpus("fuzz.jsonl", strings.NewReader(data)); err != nil {
			var ce *corpus.ReadError
			if !errors.As(err, &ce) || !strings.HasPrefix(err.Error(), "fuzz.jsonl") {
				t.Fatalf("error %v is not a ReadError naming the file", err)
			}
		}
		answers, bad, err := corpus.ReadAnswers("fuzz.jsonl", strings.NewReader(data))
		if err != nil {
			return
		}
		for _, a := range answers {
			if !json.Valid(a.Raw) {
				t.Fatalf("answer %q kept though not JSON", a.Raw)
			}
		}
		for _, b := range bad {
			if !strings.HasPrefix(b, "fuzz.jsonl:") {
				t.Fatalf("bad line report %q does not name the file and line", b)
			}
		}
	})
}
