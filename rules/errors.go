package rules

import (
	"strconv"
	"strings"
)

// ProblemKind names what is wrong with a rule set, so that callers and tests can tell problems apart without
// reading messages.
type ProblemKind int

// The kinds of problem. Errors first, then warnings (see [Finding] for which is which).
const (
	KindSyntax      ProblemKind = iota + 1 // the text is not one well-formed YAML (or JSON) document
	KindType                               // a value of the wrong type: a string where a number belongs, a list for an object
	KindMissing                            // a required field is absent or null, or the band list is empty
	KindUnknown                            // a field the format does not have
	KindDuplicate                          // the same field twice in one object
	KindNotFinite                          // NaN or ±Inf
	KindRange                              // a number outside its interval
	KindOrder                              // band edges not strictly increasing, or sample times not strictly increasing
	KindLastEdge                           // below_kmh on the last band, which has no upper edge
	KindMinAboveMax                        // min_zoom > max_zoom
	KindNotStarted                         // Step on a State that Start did not make

	// KindZoomRises (warning): a band's zoom is above the lowest zoom of the slower bands, so the map
	// would zoom in as the vehicle speeds up. Reported at that band's zoom. Equal zooms are fine.
	KindZoomRises
	// KindWideHysteresis (warning): the hysteresis swallows a band. For the first band, when
	// hysteresis_kmh ≥ its below_kmh: once left it is never entered again (that needs a speed below 0).
	// For an inner band [lo, hi), when 2·hysteresis_kmh ≥ hi − lo: speeding up the band is held on
	// [lo+h, hi+h), slowing down on [lo−h, hi−h), and no speed is in both, so no speed reliably shows it.
	// Reported at the band's below_kmh. The last band is unbounded and never too narrow.
	KindWideHysteresis
	// KindTurnInert (warning): the turn override can never change the clamped target zoom, because for
	// every band turn.zoom ≤ bands[b].zoom, or bands[b].zoom ≥ max_zoom, or turn.zoom ≤ min_zoom.
	// Reported at turn.zoom.
	KindTurnInert
)

var kindNames = [...]string{
	KindSyntax:         "syntax",
	KindType:           "type",
	KindMissing:        "missing",
	KindUnknown:        "unknown-field",
	KindDuplicate:      "duplicate-field",
	KindNotFinite:      "not-finite",
	KindRange:          "range",
	KindOrder:          "order",
	KindLastEdge:       "last-band-edge",
	KindMinAboveMax:    "min-above-max",
	KindNotStarted:     "not-started",
	KindZoomRises:      "zoom-rises",
	KindWideHysteresis: "wide-hysteresis",
	KindTurnInert:      "turn-inert",
}

// String returns the kind's stable name, as used in JSON reports ("range", "zoom-rises", …).
func (k ProblemKind) String() string {
	if k > 0 && int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "kind(" + strconv.Itoa(int(k)) + ")"
}

// MarshalText writes the kind's name, so that reports encode it as a string.
func (k ProblemKind) MarshalText() ([]byte, error) { return []byte(k.String()), nil }

// Problem is one problem with one field of a rule set or of an evaluation's input. Field is a path in
// the document's own names ("bands[1].zoom", "turn.within_m", "samples[3].t_s"; empty for the document
// as a whole) and Msg says what is wrong with the value in it ("31 is outside [0, 30]"). File, Line and
// Col are set when the rule set came from text ([Parse]); Line and Col are 1-based, 0 when unknown.
type Problem struct {
	Kind  ProblemKind
	Field string
	Msg   string
	File  string
	Line  int
	Col   int
}

// Error formats the problem as "file:line:col: field: message", leaving out the parts that are unknown.
func (e *Problem) Error() string {
	var b strings.Builder
	writePos(&b, e.File, e.Line, e.Col)
	if e.Field != "" {
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

func writePos(b *strings.Builder, file string, line, col int) {
	if file == "" && line == 0 {
		return
	}
	b.WriteString(file)
	if line > 0 {
		if file != "" {
			b.WriteByte(':')
		}
		b.WriteString(strconv.Itoa(line))
		if col > 0 {
			b.WriteByte(':')
			b.WriteString(strconv.Itoa(col))
		}
	}
	b.WriteString(": ")
}

// Errors is every problem found in one rule set, in a deterministic order (document order for a parsed
// file, field order for [Set.Validate]). It is never returned empty: a nil error means no problem.
type Errors []*Problem

// Error lists the problems one a line.
func (es Errors) Error() string {
	var b strings.Builder
	for i, e := range es {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	return b.String()
}

// Unwrap gives each problem to errors.As and errors.Is.
func (es Errors) Unwrap() []error {
	out := make([]error, len(es))
	for i, e := range es {
		out[i] = e
	}
	return out
}

// Severity says whether a [Finding] makes a rule set unusable (an error) or only questionable (a warning).
type Severity int

// The two severities.
const (
	SeverityError Severity = iota + 1
	SeverityWarning
)

// String returns "error" or "warning".
func (s Severity) String() string {
	switch s {
	case SeverityError:
		return "error"
	case SeverityWarning:
		return "warning"
	}
	return "severity(" + strconv.Itoa(int(s)) + ")"
}

// MarshalText writes "error" or "warning".
func (s Severity) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// Finding is one result of [Lint]: an error (the same problems [Parse] rejects) or a warning (a rule set
// that works but cannot mean what its author wanted). Line and Col (1-based) point at the offending YAML
// node: the value when there is one, the enclosing object when a field is missing, the key when a field is
// unknown or repeated. Col is 0 when only the line is known (some YAML syntax errors).
type Finding struct {
	Severity Severity    `json:"severity"`
	Kind     ProblemKind `json:"kind"`
	File     string      `json:"file"`
	Line     int         `json:"line"`
	Col      int         `json:"col"`
	Field    string      `json:"field"`
	Message  string      `json:"message"`
}

// String formats the finding as "file:line:col: severity: field: message".
func (f Finding) String() string {
	var b strings.Builder
	writePos(&b, f.File, f.Line, f.Col)
	b.WriteString(f.Severity.String())
	b.WriteString(": ")
	if f.Field != "" {
		b.WriteString(f.Field)
		b.WriteString(": ")
	}
	b.WriteString(f.Message)
	return b.String()
}

// fmtNum writes a number the shortest way that reads back to the same float64 ("31", "0.1", "NaN", "+Inf").
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
