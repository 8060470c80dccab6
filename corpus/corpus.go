package corpus

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"
	"sync"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"

	"github.com/viewspec/viewspec/internal/atomicfile"
)

// Case is one line of a fixture corpus: a request, the reference's answer
// to it without its decision margins (expect), and the margins apart, so
// that a checker can tell a real disagreement from a borderline one.
type Case struct {
	ID      string          `json:"id"`
	Family  string          `json:"family"`
	Op      string          `json:"op"`
	Request json.RawMessage `json:"request"`
	Expect  json.RawMessage `json:"expect"`
	Margins json.RawMessage `json:"margins"`
}

// ReadError is an unusable corpus or answer file: the file, the line and
// what was wrong.
type ReadError struct {
	File string
	Line int
	Msg  string
}

func (e *ReadError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", e.File, e.Line, e.Msg)
	}
	return e.File + ": " + e.Msg
}

// MaxLineBytes is the longest line the corpus and answer readers take.
const MaxLineBytes = wire.MaxLineBytes

// ReadCorpus reads a corpus (JSON Lines of Case) from r, checking each line
// has an id, an op and a request whose id is the case's, and that ids are
// unique. Blank lines are skipped.
func ReadCorpus(name string, r io.Reader) ([]Case, error) {
	var cases []Case
	seen := map[string]int{}
	err := EachLine(r, func(line int, b []byte, tooLong bool) error {
		if tooLong {
			return &ReadError{name, line, fmt.Sprintf("longer than %d bytes", MaxLineBytes)}
		}
		c, err := ParseCase(b)
		if err != nil {
			return &ReadError{name, line, err.Error()}
		}
		if j, dup := seen[c.ID]; dup {
			return &ReadError{name, line, fmt.Sprintf("id %q repeats line %d", c.ID, j)}
		}
		seen[c.ID] = line
		cases = append(cases, c)
		return nil
	})
	var re *ReadError
	if err != nil && !errors.As(err, &re) {
		err = &ReadError{name, 0, err.Error()}
	}
	return cases, err
}

// ParseCase reads one corpus line: it must have an id, an op, and a request
// and an expectation that are objects. The case keeps copies of its raw
// parts (one copy of the line, which its parts share).
func ParseCase(b []byte) (Case, error) {
	var c Case
	d := caseDecoders.Get().(*caseDecoder)
	ok := d.parse(b, &c)
	caseDecoders.Put(d)
	if !ok {
		return parseCaseGeneral(b)
	}
	return c, c.check()
}

// parseCaseGeneral is ParseCase by the general decoder, which takes any
// spelling the fast path leaves to it.
func parseCaseGeneral(b []byte) (Case, error) {
	var c Case
	if err := json.Unmarshal(b, &c); err != nil {
		_, msg := wire.DecodeError(err)
		return c, errors.New("not a corpus line: " + msg)
	}
	return c, c.check()
}

// check returns what a decoded case lacks.
func (c *Case) check() error {
	switch {
	case c.ID == "":
		return errors.New("id: missing")
	case c.Op == "":
		return errors.New("op: missing")
	case len(c.Request) == 0 || c.Request[0] != '{':
		return errors.New("request: missing or not an object")
	case len(c.Expect) == 0 || c.Expect[0] != '{':
		return errors.New("expect: missing or not an object")
	}
	return nil
}

// caseDecoder is a reusable token reader for corpus lines.
type caseDecoder struct {
	r       bytes.Reader
	d       *jsontext.Decoder
	strings map[string]string // ops and families met, shared by their cases
}

// intern returns the string of a quoted JSON string without escapes, the
// same string for the same bytes (a corpus has a few dozen ops and
// families); it reports false for one with escapes or too many distinct.
func (cd *caseDecoder) intern(quoted []byte) (string, bool) {
	b := quoted[1 : len(quoted)-1]
	if bytes.IndexByte(b, '\\') >= 0 {
		return "", false
	}
	if s, ok := cd.strings[string(b)]; ok {
		return s, true
	}
	if len(cd.strings) >= 1024 {
		return string(b), true
	}
	s := string(b)
	cd.strings[s] = s
	return s, true
}

var caseDecoders = sync.Pool{New: func() any {
	cd := &caseDecoder{strings: map[string]string{}}
	cd.d = jsontext.NewDecoder(&cd.r)
	return cd
}}

// parse reads the usual corpus line, an object of the six case
// keys spelt exactly, each once, with string id, family and op, without
// reflection. It reports false for anything else (other or repeated keys,
// other spellings, invalid JSON or UTF-8), which the general decoder then
// reads, so that both paths give the same case or the same error.
func (cd *caseDecoder) parse(b []byte, c *Case) bool {
	line := append([]byte(nil), b...)
	cd.r.Reset(line)
	d := cd.d
	// Repeated keys are found below, at the top level, where they matter:
	// the token reader need not keep every object's names.
	d.Reset(&cd.r, jsontext.AllowDuplicateNames(true))
	if t, err := d.ReadToken(); err != nil || t.Kind() != '{' {
		return false
	}
	seen := 0
	for d.PeekKind() == '"' {
		name, err := d.ReadValue()
		if err != nil {
			return false
		}
		// The name as written: one with escapes matches no case below and
		// is left to the general decoder.
		key, bit := "", 0
		switch string(name) {
		case `"id"`:
			key, bit = "id", 1
		case `"family"`:
			key, bit = "family", 2
		case `"op"`:
			key, bit = "op", 4
		case `"request"`:
			key, bit = "request", 8
		case `"expect"`:
			key, bit = "expect", 16
		case `"margins"`:
			key, bit = "margins", 32
		}
		if seen&bit != 0 {
			return false
		}
		seen |= bit
		switch key {
		case "id":
			t, err := d.ReadToken()
			if err != nil || t.Kind() != '"' {
				return false
			}
			c.ID = t.String()
		case "family", "op":
			v, err := d.ReadValue()
			if err != nil || v.Kind() != '"' {
				return false
			}
			str, ok := cd.intern(v)
			if !ok {
				return false
			}
			if key == "op" {
				c.Op = str
			} else {
				c.Family = str
			}
		case "request", "expect", "margins":
			v, err := d.ReadValue()
			if err != nil {
				return false
			}
			end := int(d.InputOffset())
			raw := json.RawMessage(line[end-len(v) : end : end])
			switch key {
			case "request":
				c.Request = raw
			case "expect":
				c.Expect = raw
			default:
				c.Margins = raw
			}
		default:
			return false
		}
	}
	if t, err := d.ReadToken(); err != nil || t.Kind() != '}' {
		return false
	}
	_, err := d.ReadToken()
	return err == io.EOF
}

// Answer is one answer line as read from an implementation: its id and the
// raw object.
type Answer struct {
	ID   string
	Raw  json.RawMessage
	Line int
}

// ReadAnswers reads answer lines (JSON objects with a string id) from r.
// Lines that are not JSON objects, lack a string id or are longer than
// MaxLineBytes are returned in bad with their line numbers, for the
// checker to report against no case; reading goes on past them.
func ReadAnswers(name string, r io.Reader) (answers []Answer, bad []string, err error) {
	err = EachLine(r, func(line int, b []byte, tooLong bool) error {
		if tooLong {
			bad = append(bad, fmt.Sprintf("%s:%d: longer than %d bytes, not read", name, line, MaxLineBytes))
			return nil
		}
		id, ok := AnswerID(b)
		if !ok {
			bad = append(bad, fmt.Sprintf("%s:%d: not a JSON object with a string id: %s", name, line, spec.Excerpt(b, 80)))
			return nil
		}
		answers = append(answers, Answer{ID: id, Raw: append(json.RawMessage(nil), b...), Line: line})
		return nil
	})
	if err != nil {
		return nil, nil, &ReadError{name, 0, err.Error()}
	}
	return answers, bad, nil
}

// AnswerID returns the string id of a JSON object answer. Answers usually
// begin with their id (`{"id":"…"`, no escapes), which is read without
// decoding (the comparison that follows parses the whole line and reports
// one that is not JSON); any other line is decoded in full.
func AnswerID(b []byte) (string, bool) {
	if rest, ok := bytes.CutPrefix(b, []byte(`{"id":"`)); ok {
		if end := bytes.IndexByte(rest, '"'); end >= 0 && bytes.IndexByte(rest[:end], '\\') < 0 {
			return string(rest[:end]), true
		}
	}
	var head struct {
		ID *string `json:"id"`
	}
	if len(b) == 0 || b[0] != '{' || jsonv2.Unmarshal(b, &head, jsonv2.DefaultOptionsV2()) != nil || head.ID == nil {
		return "", false
	}
	return *head.ID, true
}

// WriteFileAtomic writes name through a temporary file in the same folder
// and a rename, so that readers never see a half-written file (see package
// internal/atomicfile for what it refuses).
func WriteFileAtomic(name string, write func(w io.Writer) error) error {
	return atomicfile.Write(name, write)
}

// CheckTarget returns the error WriteFileAtomic would refuse name with
// before writing (a folder, a device, a read-only file, a missing folder),
// so that a command can refuse before long work rather than after it.
func CheckTarget(name string) error { return atomicfile.Check(name) }

// OpsIn returns the ops named in a comma-separated list, checked against
// the reference's ops.
func OpsIn(list string) (map[string]bool, error) {
	if strings.TrimSpace(list) == "" {
		return nil, nil
	}
	want := map[string]bool{}
	for _, op := range strings.Split(list, ",") {
		op = strings.TrimSpace(op)
		if !slices.Contains(reference.Ops(), op) || op == "hello" {
			return nil, errors.New("unknown op " + fmt.Sprintf("%q", op) + " (known: " + strings.Join(reference.Ops(), ", ") + ")")
		}
		want[op] = true
	}
	return want, nil
}
