package corpus

import (
	"encoding/json"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"

	"github.com/viewspec/viewspec/internal/ordered"
	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// GenVersion names the generator; with the seed and count it fixes a
// corpus byte for byte. It changes whenever generation changes.
const GenVersion = "gen/4"

// Generate writes a corpus of about count cases (every family of every
// selected op gets its share, at least one case) drawn from seed to w, and
// returns the number written. The same seed, count, ops and GenVersion give
// the same bytes. Each case's expectation is the reference's answer.
func Generate(w io.Writer, seed uint64, count int, only map[string]bool) (int, error) {
	var total float64
	for _, p := range props.Plans() {
		if only == nil || only[p.Op] {
			total += p.Weight
		}
	}
	// Each case has a random source of its own (caseRand), so cases are
	// made on every core and written in order.
	n := 0
	err := ordered.Map(genBatchSize, func(emit func(genJob) bool) error {
		for _, p := range props.Plans() {
			if only != nil && !only[p.Op] {
				continue
			}
			per := max(1, int(math.Round(float64(count)*p.Weight/total/float64(len(p.Families)))))
			for _, fam := range p.Families {
				for k := range per {
					if !emit(genJob{p.Op, fam, k}) {
						return nil
					}
				}
			}
		}
		return nil
	}, func(j genJob) genLine {
		c, err := genCase(seed, j.op, j.fam, j.k)
		if err != nil {
			return genLine{err: err}
		}
		line, err := appendCase(nil, c)
		return genLine{line, err}
	}, func(_ genJob, l genLine) error {
		if l.err != nil {
			return l.err
		}
		if _, err := w.Write(l.line); err != nil {
			return err
		}
		n++
		return nil
	})
	return n, err
}

// genBatchSize is how many cases one worker makes at a time.
const genBatchSize = 32

// genJob names one case to make: its op, family and index.
type genJob struct {
	op  string
	fam props.Family
	k   int
}

// genLine is a case made: its line, or why it could not be.
type genLine struct {
	line []byte
	err  error
}

// caseRand is the random source of one case: the seed and a hash of the
// case's op, family and index, so a case does not depend on which other ops
// or how many cases were asked for.
func caseRand(seed uint64, op, fam string, k int) *rand.Rand {
	h := fnv.New64a()
	var b [64]byte
	h.Write(strconv.AppendInt(append(append(append(append(b[:0], op...), '/'), fam...), '/'), int64(k), 10))
	return rand.New(rand.NewPCG(seed, h.Sum64()))
}

// caseNumber returns k with at least four digits, zeros first.
func caseNumber(k int) string {
	s := strconv.Itoa(k)
	if len(s) < 4 {
		s = "0000"[len(s):] + s
	}
	return s
}

func genCase(seed uint64, op string, fam props.Family, k int) (Case, error) {
	rng := caseRand(seed, op, fam.Name, k)
	id := op + "/" + fam.Name + "/" + caseNumber(k)
	for try := 0; ; try++ {
		if fam.Raw != nil {
			raw, err := fam.Raw(rng)
			if err == nil {
				if c, err := NewRawCase(id, fam.Name, op, raw); err == nil {
					return c, nil
				}
			}
			if try > 1000 {
				return Case{}, fmt.Errorf("case %s: no wire error drawn in 1000 tries: %v", id, err)
			}
			continue
		}
		req, err := fam.Draw(rng)
		if err != nil {
			if try > 1000 {
				return Case{}, fmt.Errorf("case %s: no valid draw in 1000 tries: %v", id, err)
			}
			continue
		}
		req.Op = op
		req.ID = json.RawMessage(strconv.Quote(id))
		return buildCase(id, fam.Name, req)
	}
}

// NewCase makes a corpus case of req (whose op must be set): the request
// with id as its id, the reference's answer to it and the margins apart.
func NewCase(id, fam string, req *wire.Request) (Case, error) {
	req.ID = json.RawMessage(strconv.Quote(id))
	return buildCase(id, fam, req)
}

// NewRawCase makes a corpus case of a request line that breaks the wire's
// rules (raw JSON object, without an id): the line with id inserted first,
// and the reference's error answer to it, its message without the line
// number. It refuses a line the reference answers without an error.
func NewRawCase(id, fam, op string, raw []byte) (Case, error) {
	if len(raw) < 2 || raw[0] != '{' {
		return Case{}, errors.New("a raw request must be a JSON object")
	}
	line := wire.AppendString([]byte(`{"id":`), id)
	if len(raw) > 2 {
		line = append(line, ',')
	}
	line = append(line, raw[1:]...)
	ans := reference.AnswerLine(line, 1)
	var a wire.ErrorAnswer
	if err := json.Unmarshal(ans, &a); err != nil || a.Error.Code == "" {
		return Case{}, fmt.Errorf("the reference answers %s without an error", spec.Excerpt(line, 200))
	}
	a.Error.Message = strings.TrimPrefix(a.Error.Message, "line 1: ")
	c := Case{ID: id, Family: fam, Op: op, Request: line, Margins: json.RawMessage(`{}`)}
	var err error
	c.Expect, err = wire.Marshal(a)
	return c, err
}

// buildCase answers req with the reference and splits the margins off.
func buildCase(id, fam string, req *wire.Request) (Case, error) {
	c := Case{ID: id, Family: fam, Op: req.Op}
	var err error
	if c.Request, err = wire.Marshal(req); err != nil {
		return c, err
	}
	ans, m, aerr := reference.Answer(req)
	var margins any = struct{}{}
	if aerr != nil {
		ans = wire.ErrorAnswer{Head: wire.Head{ID: req.ID}, Error: wire.ErrorBody{Code: wire.Code(aerr), Message: aerr.Error()}}
	} else {
		margins = m
	}
	if c.Expect, err = wire.Marshal(ans); err != nil {
		return c, err
	}
	if c.Margins, err = wire.Marshal(margins); err != nil {
		return c, err
	}
	return c, nil
}

// CaseLine returns c as one corpus line, newline included.
func CaseLine(c Case) ([]byte, error) { return appendCase(nil, c) }

// appendCase writes the line by hand: its raw parts are already compact
// JSON from marshal, and re-encoding them would scan every byte again.
func appendCase(b []byte, c Case) ([]byte, error) {
	b = append(b, `{"id":`...)
	b = wire.AppendString(b, c.ID)
	b = append(b, `,"family":`...)
	b = wire.AppendString(b, c.Family)
	b = append(b, `,"op":`...)
	b = wire.AppendString(b, c.Op)
	b = append(b, `,"request":`...)
	b = append(b, c.Request...)
	b = append(b, `,"expect":`...)
	b = append(b, c.Expect...)
	b = append(b, `,"margins":`...)
	b = append(b, c.Margins...)
	return append(b, "}\n"...), nil
}
