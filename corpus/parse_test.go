package corpus

import (
	"bytes"
	"os"
	"testing"
)

// sameCase reports whether two parses agree: the same parts byte for
// byte, or the same error.
func sameCase(t *testing.T, line []byte) {
	t.Helper()
	fast, ferr := ParseCase(line)
	gen, gerr := parseCaseGeneral(line)
	if (ferr == nil) != (gerr == nil) || ferr != nil && ferr.Error() != gerr.Error() {
		t.Fatalf("ParseCase(%q): error %v, the general decoder's %v", line, ferr, gerr)
	}
	if ferr != nil {
		return
	}
	if fast.ID != gen.ID || fast.Family != gen.Family || fast.Op != gen.Op ||
		!bytes.Equal(fast.Request, gen.Request) || !bytes.Equal(fast.Expect, gen.Expect) || !bytes.Equal(fast.Margins, gen.Margins) {
		t.Fatalf("ParseCase(%q) = %+v, the general decoder's %+v", line, fast, gen)
	}
}

// TestParseCaseFastPathOnDefaultCorpus holds the fast case reader to the
// general decoder on every line of the default corpus.
func TestParseCaseFastPathOnDefaultCorpus(t *testing.T) {
	data, err := os.ReadFile("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	err = EachLine(bytes.NewReader(data), func(_ int, line []byte, _ bool) error {
		sameCase(t, line)
		n++
		return nil
	})
	if err != nil || n < 1000 {
		t.Fatalf("read %d lines of the default corpus, err %v", n, err)
	}
}

// FuzzParseCase: the fast case reader and the general decoder give the
// same case or the same error on any line.
func FuzzParseCase(f *testing.F) {
	for _, s := range []string{
		`{"id":"a","family":"f","op":"project","request":{"id":"a"},"expect":{"id":"a"},"margins":{}}`,
		`{"ID":"a","op":"project","request":{},"expect":{}}`,
		`{"id":"a","id":"b","op":"project","request":{},"expect":{}}`,
		`{"id":"a\u0062","op":"p","request": { "x" : [1, 2] } ,"expect":{},"extra":1}`,
		`{"id":null,"op":"p","request":{},"expect":{}}`,
		`{"id":"a","op":"p","request":null,"expect":{}}`,
		`{"id":"\xff","op":"p","request":{},"expect":{}}`,
		`{"id":"a","op":"p","request":{},"expect":{}} {}`,
		`[1]`,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, line []byte) { sameCase(t, line) })
}
