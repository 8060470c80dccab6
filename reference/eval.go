package reference

import (
	"io"
	"slices"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// opFunc answers one op's request with an answer value (marshalled as a
// JSON object) or an error, a *spec.FieldError naming the field at fault.
// When m is not nil it also fills in the margins the answer does not carry
// (the horizon of unproject, the emptiness of footprint), from what it
// computed for the answer.
type opFunc func(req *wire.Request, m *wire.Margins) (any, error)

// ops is the reference's table of ops, by wire name. It is filled in init
// because hello's answer lists the table itself.
var ops map[string]opFunc

func init() {
	ops = map[string]opFunc{
		"hello":     evalHello,
		"project":   evalProject,
		"unproject": evalUnproject,
		"footprint": evalFootprint,
		"horizon":   evalHorizon,
		"metrics":   evalMetrics,
		"zoom":      evalZoom,
		"timeline":  evalTimeline,
	}
}

// Ops returns the names of the ops the reference speaks, sorted; hello is
// one of them.
func Ops() []string {
	names := make([]string, 0, len(ops))
	for n := range ops {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

// Evaluate answers req as the reference does: the answer value, or an
// error saying what was wrong with the request (a *spec.FieldError, or a
// *wire.UnknownOpError).
func Evaluate(req *wire.Request) (any, error) {
	f, ok := ops[req.Op]
	if !ok {
		if !req.OpGiven() {
			return nil, spec.Absent("op")
		}
		return nil, &wire.UnknownOpError{Op: req.Op, Known: Ops()}
	}
	return f(req, nil)
}

// Serve answers the JSON Lines requests on r as the reference, one answer
// line on w for each (see wire.Serve).
func Serve(r io.Reader, w io.Writer) error { return wire.Serve(r, w, Evaluate) }

// AnswerLine returns the reference's answer line (without the newline) to
// one request line, as Serve would write it for line number lineNo.
func AnswerLine(line []byte, lineNo int) []byte { return wire.AnswerLine(line, lineNo, Evaluate) }

func evalHello(req *wire.Request, _ *wire.Margins) (any, error) {
	return &wire.HelloAnswer{Head: wire.Head{ID: req.ID}, Spec: spec.Version, Ops: Ops()}, nil
}
