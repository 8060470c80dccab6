package wire_test

import (
	"bufio"
	"bytes"
	"encoding/json"
	"io"
	"strings"
	"testing"
	"time"

	"github.com/viewspec/viewspec/wire"
)

// echoOp answers every request with its op.
func echoOp(req *wire.Request) (any, error) {
	return map[string]string{"op": req.Op}, nil
}

// serveString runs wire.Serve over in and returns what it wrote.
func serveString(t *testing.T, in string) string {
	t.Helper()
	var out bytes.Buffer
	if err := wire.Serve(strings.NewReader(in), &out, echoOp); err != nil {
		t.Fatalf("Serve: %v", err)
	}
	return out.String()
}

// A last line without a newline is still a request, and is answered.
func TestServeLastLineWithoutNewline(t *testing.T) {
	if got, want := serveString(t, `{"op":"a"}`+"\n"+`{"op":"b"}`), `{"op":"a"}`+"\n"+`{"op":"b"}`+"\n"; got != want {
		t.Errorf("Serve(two lines, the last unterminated) = %q, want %q", got, want)
	}
}

// A line of MaxLineBytes bytes, its newline included, is read; one byte
// more is line_too_long (SPEC §6: at most 16 MiB).
func TestServeLineLengthLimit(t *testing.T) {
	line := func(n int) string {
		head := `{"op":"x","pad":"`
		return head + strings.Repeat("a", n-len(head)-3) + `"}` + "\n"
	}
	in := line(wire.MaxLineBytes) + line(wire.MaxLineBytes+1)
	got := strings.Split(strings.TrimSuffix(serveString(t, in), "\n"), "\n")
	if len(got) != 2 || got[0] != `{"op":"x"}` || !strings.Contains(got[1], `"line_too_long"`) {
		t.Errorf("Serve(a line of MaxLineBytes, then one byte longer) = %.200q, want the first answered and the second line_too_long", got)
	}
}

// Each answer is written out before Serve waits for the next line, so that
// a peer sending one line at a time and waiting for its answer is not left
// waiting.
func TestServeAnswersBeforeReadingOn(t *testing.T) {
	inR, inW := io.Pipe()
	outR, outW := io.Pipe()
	done := make(chan error, 1)
	go func() { done <- wire.Serve(inR, outW, echoOp); outW.Close() }()
	answers := bufio.NewReader(outR)
	for _, op := range []string{"a", "b"} {
		if _, err := io.WriteString(inW, `{"op":"`+op+`"}`+"\n"); err != nil {
			t.Fatal(err)
		}
		got := make(chan string, 1)
		go func() { s, _ := answers.ReadString('\n'); got <- s }()
		select {
		case s := <-got:
			if want := `{"op":"` + op + `"}` + "\n"; s != want {
				t.Fatalf("answer to %s = %q, want %q", op, s, want)
			}
		case <-time.After(10 * time.Second):
			t.Fatalf("no answer to line %s within 10 s while Serve waits for the next line", op)
		}
	}
	inW.Close()
	if err := <-done; err != nil {
		t.Fatal(err)
	}
}

// AppendString writes a string as encoding/json does (outside oracle: the
// standard library's encoder, which escapes <, > and &, control bytes,
// U+2028 and U+2029, and replaces invalid UTF-8).
func TestAppendStringAsEncodingJSON(t *testing.T) {
	for _, s := range []string{"", "plain id", "a\"b", `a\b`, "\"", `\`, "<", ">", "&", "x\x00", "\x1f", " ", "~\x7f", "é", "\u2028", "\xff", "tail<"} {
		want, _ := json.Marshal(s)
		if got := wire.AppendString([]byte("k:"), s); string(got) != "k:"+string(want) {
			t.Errorf("AppendString(%q) = %s, want k:%s", s, got, want)
		}
	}
}

// Decoding skips fields the op does not read whatever their type, wherever
// they sit: after a nested object, with space before the colon. A field it
// reads with a wrong type is bad_type even when it comes before the op,
// and an element's path names its index, 0 included.
func TestDecodeFieldsOpDoesNotRead(t *testing.T) {
	for _, line := range []string{
		`{"op":"hello","a":{"b":[1,{"c":2}]},"points":"x"}`,
		`{"op":"hello", "points" : "x"}`,
		`{"points":"x","op":"hello"}`,
	} {
		var req wire.Request
		if err := wire.DecodeRequest([]byte(line), &req); err != nil || req.Op != "hello" {
			t.Errorf("DecodeRequest(%s) = %v (op %q), want hello and no error", line, err, req.Op)
		}
	}
	for _, c := range []struct{ line, want string }{
		{`{"points":"x","op":"project"}`, "points"},
		{`{"op":"project","points":[{"lat":"x","lon":0}]}`, "points[0].lat"},
	} {
		var req wire.Request
		err := wire.DecodeRequest([]byte(c.line), &req)
		code, msg := wire.DecodeError(err)
		if code != "bad_type" || !strings.Contains(msg, c.want+" ") && !strings.HasSuffix(msg, c.want) && !strings.Contains(msg, c.want+":") {
			t.Errorf("DecodeRequest(%s) = %s %q, want bad_type naming %s", c.line, code, msg, c.want)
		}
	}
}

// Margins are written by hand as encoding/json writes them (outside
// oracle: the standard library's encoder): empty lists left out, null
// entries, the empty-footprint margin alone or among lists.
func TestMarginsAsEncodingJSON(t *testing.T) {
	one, half, big := 1.0, 0.5, 1e21
	for _, m := range []*wire.Margins{
		{},
		{EmptyPx: &half},
		{MarginPx: []*float64{&one, nil, &big}},
		{HorizonPx: []*float64{nil}, EmptyPx: &half, TurnMarginDeg: []*float64{&one}},
		{SideMarginM: []*float64{&half}, ChoiceMarginM: []*float64{nil, &one}, BucketMarginS: []*float64{&one}, FirstShownMarginPx: []*float64{&half}},
		{MarginPx: []*float64{}, BucketMarginS: []*float64{&one, &half}},
	} {
		want, _ := json.Marshal(m)
		got, err := wire.Marshal(m)
		if err != nil || string(got) != string(want) {
			t.Errorf("Marshal(%+v) = %s, %v, want %s", *m, got, err, want)
		}
	}
}
