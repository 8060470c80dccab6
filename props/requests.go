package props

import (
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/wire"
)

// RapidSource is a Source that draws from rapid, so that the prober draws
// its cases from the same families as the corpus and rapid can shrink
// them: every number shrinks toward 0, which is each uniform's low end and
// each choice's first alternative. A draw that keeps asking for numbers
// past a budget (a family retrying a rejected draw) is skipped.
type RapidSource struct {
	T *rapid.T
	n int
}

// maxDraws is the most numbers one request may take from a RapidSource.
const maxDraws = 20000

func (s *RapidSource) spend() {
	if s.n++; s.n > maxDraws {
		s.T.Skip("the family's draw took more than 20,000 numbers")
	}
}

// Float64 draws a number in [0, 1): a whole number of 2⁻⁵³ steps, so that
// it shrinks to 0 as whole numbers do (rapid shrinks a float toward the
// simplest float of its range, which need not be the low end).
func (s *RapidSource) Float64() float64 {
	s.spend()
	return float64(rapid.Uint64Range(0, 1<<53-1).Draw(s.T, "u")) * 0x1p-53
}

// IntN draws a whole number in [0, n).
func (s *RapidSource) IntN(n int) int {
	s.spend()
	return rapid.IntRange(0, n-1).Draw(s.T, "i")
}

// LabelledRequest is a wire request and the family it was drawn from: a
// Request, or for a family of wire errors the Raw line (op set, no id).
type LabelledRequest struct {
	Family  string
	Request *wire.Request
	Raw     []byte
}

// PlanOf returns the plan of op, and false when op has none (hello).
func PlanOf(op string) (Plan, bool) {
	for _, p := range Plans() {
		if p.Op == op {
			return p, true
		}
	}
	return Plan{}, false
}

// ProbeRequest draws a request of op (one of the reference's ops, hello
// aside) from op's families (Plans), and its family; shrinking leads to
// the first, plain family. It panics for an op without families.
func ProbeRequest(op string) *rapid.Generator[LabelledRequest] {
	plan, ok := PlanOf(op)
	if !ok {
		panic("props: no families for op " + op)
	}
	return rapid.Custom(func(t *rapid.T) LabelledRequest {
		f := plan.Families[rapid.IntRange(0, len(plan.Families)-1).Draw(t, op+"_family")]
		src := &RapidSource{T: t}
		for f.Raw != nil {
			if raw, err := f.Raw(src); err == nil {
				return LabelledRequest{Family: f.Name, Raw: raw}
			}
		}
		for {
			req, err := f.Draw(src)
			if err == nil {
				req.Op = op
				return LabelledRequest{Family: f.Name, Request: req}
			}
		}
	})
}
