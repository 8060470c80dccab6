package wire_test

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"runtime"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/wire"
)

const camJSON = `{"lat":44.9312,"lon":-31.1704,"heading_deg":30,"pitch_deg":50,"zoom":16.5,"device":{"width_px":390,"height_px":844,"fov_y_deg":45,"anchor_y":0.75}}`

func serve(t *testing.T, in string) []map[string]any {
	t.Helper()
	var out bytes.Buffer
	if err := reference.Serve(strings.NewReader(in), &out); err != nil {
		t.Fatalf("Serve: %v", err)
	}
	var answers []map[string]any
	sc := bufio.NewScanner(&out)
	for sc.Scan() {
		var m map[string]any
		if err := json.Unmarshal(sc.Bytes(), &m); err != nil {
			t.Fatalf("answer line %q is not a JSON object: %v", sc.Text(), err)
		}
		answers = append(answers, m)
	}
	return answers
}

// Each bad line gets an error object naming the line and the field, and the
// stream goes on in order.
func TestServeErrorsAndOrder(t *testing.T) {
	lines := []struct {
		line     string
		wantCode string // "" for an answer
		wantMsg  string
	}{
		{`{"op":"hello","id":1}`, "", ""},
		{`{"op":"footprint","id":2,"camera":` + strings.Replace(camJSON, `"pitch_deg":50`, `"pitch_deg":95`, 1) + `}`,
			wire.CodeInvalid, "line 2: camera.pitch_deg = 95"},
		{`{"op":"footprint","id":3,"camera":` + strings.Replace(camJSON, `"lat":44.9312`, `"lat":"NaN"`, 1) + `}`,
			wire.CodeBadType, "line 3: camera.lat: expected a number, got a string"},
		{`{"op":"footprint","id":4,"camera":` + strings.Replace(camJSON, `"width_px":390`, `"width_px":0`, 1) + `}`,
			wire.CodeInvalid, "line 4: camera.device.width_px = 0"},
		{`{"op":"footprint","id":5,"camera":` + strings.Replace(camJSON, `"anchor_y":0.75`, `"inset_left_px":200,"inset_right_px":190`, 1) + `}`,
			wire.CodeInvalid, "line 5: camera.device.inset_left_px+inset_right_px = 390"},
		{`{"op":"footprint","id":6,"camera":{"lat":44.9`, wire.CodeMalformed, "line 6: malformed JSON"},
		{`{"op":"teleport","id":7}`, wire.CodeUnknownOp, `line 7: op: unknown op "teleport"`},
		{`{"id":8}`, wire.CodeMissing, "line 8: op: missing"},
		{`{"op":"project","id":9,"camera":` + camJSON + `}`, wire.CodeMissing, "line 9: points: missing"},
		{`{"op":"project","id":10,"camera":` + camJSON + `,"points":[{"lat":44.93}]}`, wire.CodeMissing, "line 10: points[0].lon: missing"},
		{`{"op":"project","id":11,"camera":` + strings.Replace(camJSON, `"zoom":16.5,`, ``, 1) + `,"points":[]}`, wire.CodeMissing, "line 11: camera.zoom: missing"},
		{`"just a string"`, wire.CodeMalformed, "line 12: a request must be a JSON object"},
		{`{"op":"footprint","id":13,"camera":` + camJSON + `}`, "", ""},
	}
	var in strings.Builder
	for _, l := range lines {
		in.WriteString(l.line + "\n")
	}
	answers := serve(t, in.String())
	if len(answers) != len(lines) {
		t.Fatalf("got %d answers for %d lines", len(answers), len(lines))
	}
	for i, l := range lines {
		a := answers[i]
		e, isErr := a["error"].(map[string]any)
		if l.wantCode == "" {
			if isErr {
				t.Errorf("line %d: unexpected error %v", i+1, e)
			}
			continue
		}
		if !isErr {
			t.Errorf("line %d: got answer %v, want error %s", i+1, a, l.wantCode)
			continue
		}
		if e["code"] != l.wantCode || !strings.Contains(e["message"].(string), l.wantMsg) {
			t.Errorf("line %d: error %v, want code %s and a message containing %q", i+1, e, l.wantCode, l.wantMsg)
		}
		// The id is echoed wherever the line parsed far enough to hold one.
		if id, ok := a["id"]; ok && fmt.Sprint(id) != fmt.Sprint(i+1) {
			t.Errorf("line %d: echoed id %v", i+1, id)
		}
	}
}

// Blank lines are not requests; CRLF endings and a last line without a
// newline are answered.
func TestServeBlankLinesAndEndings(t *testing.T) {
	answers := serve(t, "\n{\"op\":\"hello\",\"id\":1}\r\n   \n\n{\"op\":\"hello\",\"id\":2}")
	if len(answers) != 2 || answers[0]["id"] != 1.0 || answers[1]["id"] != 2.0 {
		t.Fatalf("answers = %v, want ids 1 and 2", answers)
	}
}

// A line longer than the limit is answered with line_too_long, and the next
// line is still answered.
func TestServeLineTooLong(t *testing.T) {
	long := `{"op":"hello","pad":"` + strings.Repeat("x", wire.MaxLineBytes) + `"}`
	answers := serve(t, long+"\n"+`{"op":"hello","id":2}`+"\n")
	if len(answers) != 2 {
		t.Fatalf("got %d answers, want 2", len(answers))
	}
	if e, _ := answers[0]["error"].(map[string]any); e == nil || e["code"] != wire.CodeLineTooLong {
		t.Fatalf("first answer %v, want line_too_long", answers[0])
	}
	if answers[1]["id"] != 2.0 {
		t.Fatalf("second answer %v, want id 2", answers[1])
	}
}

// lineSource yields n copies of line, without holding them in memory.
type lineSource struct {
	line []byte
	n    int
	off  int
}

func (s *lineSource) Read(p []byte) (int, error) {
	written := 0
	for written < len(p) {
		if s.n == 0 {
			if written == 0 {
				return 0, io.EOF
			}
			return written, nil
		}
		c := copy(p[written:], s.line[s.off:])
		written += c
		s.off += c
		if s.off == len(s.line) {
			s.off = 0
			s.n--
		}
	}
	return written, nil
}

// countingSink counts answer lines and samples the heap as they pass.
type countingSink struct {
	lines   int
	maxHeap uint64
}

func (c *countingSink) Write(p []byte) (int, error) {
	before := c.lines
	c.lines += bytes.Count(p, []byte{'\n'})
	if c.lines/100000 != before/100000 {
		// The live heap: collected first, so that garbage not yet swept
		// (other tests of the package run beside this one) is not taken
		// for growth.
		runtime.GC()
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		c.maxHeap = max(c.maxHeap, ms.HeapInuse)
	}
	return len(p), nil
}

// A million-line stream is answered in constant memory.
func TestServeMillionLinesConstantMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("a million lines; skipped with -short")
	}
	const n = 1_000_000
	src := &lineSource{line: []byte(`{"op":"hello","id":7}` + "\n"), n: n}
	var sink countingSink
	if err := reference.Serve(src, &sink); err != nil {
		t.Fatal(err)
	}
	if sink.lines != n {
		t.Fatalf("answered %d lines of %d", sink.lines, n)
	}
	// The reader and writer buffers are 64 KiB each; the heap in use stays
	// far below what a million answers would take (~60 MB).
	if sink.maxHeap > 16<<20 {
		t.Fatalf("heap in use reached %d bytes while streaming", sink.maxHeap)
	}
	t.Logf("1,000,000 lines, heap in use at most %.1f MiB", float64(sink.maxHeap)/(1<<20))
}

// FuzzServe: any bytes on a line give exactly one JSON object back per
// non-blank line, never a panic.
func FuzzServe(f *testing.F) {
	f.Add(`{"op":"hello","id":1}`)
	f.Add(`{"op":"project","camera":` + camJSON + `,"points":[{"lat":44.93,"lon":-31.17}]}`)
	f.Add(`{"op":"unproject","camera":` + camJSON + `,"pixels":[{"x":1,"y":2},null]}`)
	f.Add(`{"op":"footprint","camera":` + camJSON + `}`)
	f.Add(`{"op":"footprint","camera":{"lat":1e400}}`)
	f.Add(`{"op":"horizon","id":1,"camera":` + camJSON + `}`)
	f.Add(`{"op":"horizon","camera":{"pitch_deg":"x"}}`)
	f.Add(`{"op":"project","camera":null,"points":[null]}`)
	f.Add(`{"op":"metrics","route":{"points":[{"lat":0,"lon":0},{"lat":0,"lon":0.01}],"speed_mps":[10]},"user":{"lat":0,"lon":0.002},"markers":[{"id":"a","lat":0.001,"lon":0.005}],"camera":` + camJSON + `}`)
	f.Add(`{"op":"metrics","route":{"points":[{"lat":0,"lon":0},{"lat":0,"lon":0}],"speed_mps":"fast"},"user":null,"markers":[{"id":1}]}`)
	f.Add(`{"op":"zoom","rules":{"bands":[{"zoom":16,"pitch_deg":0}],"hysteresis_kmh":0,"max_zoom_rate_per_s":1,"max_pitch_rate_deg_per_s":1,"turn":{"within_m":0,"min_angle_deg":30,"zoom":16},"min_zoom":0,"max_zoom":20,"max_turn_rate_deg_per_s":30},"samples":[{"t_s":0,"speed_mps":3}]}`)
	f.Add(`{"op":"timeline","route":{"points":[{"lat":0,"lon":0},{"lat":0.01,"lon":0}],"speed_mps":10},"device":{"width_px":100,"height_px":100,"fov_y_deg":45},"rules":{"bands":[{"zoom":16,"pitch_deg":0}],"hysteresis_kmh":0,"max_zoom_rate_per_s":1,"max_pitch_rate_deg_per_s":1,"turn":{"within_m":0,"min_angle_deg":30,"zoom":16},"min_zoom":0,"max_zoom":20,"max_turn_rate_deg_per_s":30},"markers":[{"id":"a","lat":0.001,"lon":0}],"horizon_s":2,"tick_s":0.5}`)
	f.Add(`[`)
	f.Add(`{"op":"footprint","id":{"nested":[1,2]},"camera":` + camJSON + `}`)
	f.Fuzz(func(t *testing.T, line string) {
		if strings.ContainsAny(line, "\n\r") || strings.TrimSpace(line) == "" {
			return
		}
		var out bytes.Buffer
		if err := reference.Serve(strings.NewReader(line+"\n"), &out); err != nil {
			t.Fatalf("Serve: %v", err)
		}
		got := bytes.Split(bytes.TrimSuffix(out.Bytes(), []byte{'\n'}), []byte{'\n'})
		if len(got) != 1 {
			t.Fatalf("%d answer lines for one request", len(got))
		}
		var m map[string]json.RawMessage
		if err := json.Unmarshal(got[0], &m); err != nil {
			t.Fatalf("answer %q is not a JSON object: %v", got[0], err)
		}
	})
}

// BenchmarkServeProject measures the evaluator's line loop on one-point
// project requests from an in-memory reader to an in-memory writer.
func BenchmarkServeProject(b *testing.B) {
	line := []byte(`{"op":"project","id":1,"camera":` + camJSON + `,"points":[{"lat":44.9330,"lon":-31.1690}]}` + "\n")
	src := &lineSource{line: line, n: b.N}
	var sink countingSink
	b.ReportAllocs()
	b.ResetTimer()
	if err := reference.Serve(src, &sink); err != nil {
		b.Fatal(err)
	}
	b.StopTimer()
	if sink.lines != b.N {
		b.Fatalf("answered %d of %d", sink.lines, b.N)
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "requests/s")
}
