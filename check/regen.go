package check

import (
	"bytes"
	"cmp"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/viewspec/viewspec/corpus"
)

// Kinds of change between a corpus and its regeneration, most serious first.
const (
	// ChangeFlipped: the answer changed a decision (in view, side, bucket,
	// a value where there was null, an error code, a count of vertices…).
	ChangeFlipped = "flipped"
	// ChangeBeyond: numbers moved beyond the profile's tolerance.
	ChangeBeyond = "beyond"
	// ChangeRequest: the generator drew another request under the same id.
	ChangeRequest = "request"
	// ChangeAdded and ChangeRemoved: an id in one corpus only.
	ChangeAdded   = "added"
	ChangeRemoved = "removed"
	// ChangeRounding: numbers moved within the profile's tolerance.
	ChangeRounding = "rounding"
	// ChangeMargins: only the decision margins changed.
	ChangeMargins = "margins"
)

// changeOrder ranks the kinds, most serious first.
var changeOrder = []string{ChangeFlipped, ChangeBeyond, ChangeRequest, ChangeAdded, ChangeRemoved, ChangeRounding, ChangeMargins}

// why tells a reviewer what each kind of change means.
var why = map[string]string{
	ChangeFlipped:  "a decision flipped: a behaviour change; trace it to the SPEC rule it follows before accepting it",
	ChangeBeyond:   "numbers moved beyond the tolerance: more than rounding, a formula changed",
	ChangeRequest:  "another request under the same id: expected after a generator change (corpus.GenVersion), else the draw changed",
	ChangeAdded:    "a new case",
	ChangeRemoved:  "a case no longer generated",
	ChangeRounding: "rounding only: numbers moved within the tolerance",
	ChangeMargins:  "only a decision margin moved: the answer stands",
}

// FieldChange is one JSON value of a case that differs: its path (as
// check's diffs name paths, "screen[2].x"), the old and new values as
// written, and |new − old| for two numbers (NaN otherwise: a flip).
type FieldChange struct {
	Path     string
	Old, New string
	Diff     float64
}

// Flip reports whether the change is not between two numbers.
func (f FieldChange) Flip() bool { return math.IsNaN(f.Diff) }

// CaseChange is how the case of one id differs between a corpus and its
// regeneration: the kind (the most serious that applies), the changed
// values of the answer (or of the margins, or the request), and the
// verdict of the new answer against the old expectation under the profile.
type CaseChange struct {
	ID, Family, Op string
	Kind           string
	Status         Status
	Fields         []FieldChange
}

// CorpusChanges compares the cases of a corpus before (old) and after
// (next) regeneration, by id, judging changed answers with the profile,
// and returns the cases that differ, most serious first, then by id.
func CorpusChanges(old, next []corpus.Case, p *Profile) []CaseChange {
	before := make(map[string]*corpus.Case, len(old))
	for i := range old {
		before[old[i].ID] = &old[i]
	}
	var out []CaseChange
	seen := make(map[string]bool, len(next))
	for i := range next {
		n := &next[i]
		seen[n.ID] = true
		o, ok := before[n.ID]
		c := CaseChange{ID: n.ID, Family: n.Family, Op: n.Op}
		switch {
		case !ok:
			c.Kind = ChangeAdded
		case !sameJSON(o.Request, n.Request) || o.Op != n.Op:
			c.Kind, c.Fields = ChangeRequest, jsonChanges(o.Request, n.Request)
		case !sameJSON(o.Expect, n.Expect):
			c.Fields = jsonChanges(o.Expect, n.Expect)
			c.Status, _ = Compare(o, n.Expect, p)
			c.Kind = ChangeRounding
			switch {
			case slices.ContainsFunc(c.Fields, FieldChange.Flip):
				c.Kind = ChangeFlipped
			case c.Status != Pass:
				c.Kind = ChangeBeyond
			}
		case !sameJSON(o.Margins, n.Margins):
			c.Kind, c.Fields = ChangeMargins, jsonChanges(o.Margins, n.Margins)
		default:
			continue
		}
		out = append(out, c)
	}
	for i := range old {
		if !seen[old[i].ID] {
			out = append(out, CaseChange{ID: old[i].ID, Family: old[i].Family, Op: old[i].Op, Kind: ChangeRemoved})
		}
	}
	slices.SortStableFunc(out, func(a, b CaseChange) int {
		return cmp.Or(cmp.Compare(slices.Index(changeOrder, a.Kind), slices.Index(changeOrder, b.Kind)), cmp.Compare(a.ID, b.ID))
	})
	return out
}

// sameJSON reports whether two JSON texts are the same bytes once
// compacted.
func sameJSON(a, b json.RawMessage) bool {
	if bytes.Equal(a, b) {
		return true
	}
	var ca, cb bytes.Buffer
	if json.Compact(&ca, a) != nil || json.Compact(&cb, b) != nil {
		return false
	}
	return bytes.Equal(ca.Bytes(), cb.Bytes())
}

// jsonChanges lists the values that differ between two JSON texts, in
// path order.
func jsonChanges(a, b json.RawMessage) []FieldChange {
	va, errA := decodeNumbers(a)
	vb, errB := decodeNumbers(b)
	if errA != nil || errB != nil {
		return []FieldChange{{Path: "", Old: string(a), New: string(b), Diff: math.NaN()}}
	}
	var out []FieldChange
	walkChanges(&out, "", va, vb)
	return out
}

func decodeNumbers(raw json.RawMessage) (any, error) {
	if len(raw) == 0 {
		return nil, nil
	}
	d := json.NewDecoder(bytes.NewReader(raw))
	d.UseNumber()
	var v any
	err := d.Decode(&v)
	return v, err
}

// walkChanges appends the differences between a and b at path.
func walkChanges(out *[]FieldChange, path string, a, b any) {
	switch x := a.(type) {
	case map[string]any:
		if y, ok := b.(map[string]any); ok {
			keys := make([]string, 0, len(x)+len(y))
			for k := range x {
				keys = append(keys, k)
			}
			for k := range y {
				if _, ok := x[k]; !ok {
					keys = append(keys, k)
				}
			}
			slices.Sort(keys)
			for _, k := range keys {
				walkChanges(out, strings.TrimPrefix(path+"."+k, "."), x[k], y[k])
			}
			return
		}
	case []any:
		if y, ok := b.([]any); ok && len(y) == len(x) {
			for i := range x {
				walkChanges(out, path+"["+strconv.Itoa(i)+"]", x[i], y[i])
			}
			return
		} else if ok {
			*out = append(*out, FieldChange{Path: path, Old: fmt.Sprintf("%d entries", len(x)), New: fmt.Sprintf("%d entries", len(y)), Diff: math.NaN()})
			return
		}
	case json.Number:
		if y, ok := b.(json.Number); ok {
			if x != y {
				fx, _ := x.Float64()
				fy, _ := y.Float64()
				*out = append(*out, FieldChange{Path: path, Old: string(x), New: string(y), Diff: math.Abs(fy - fx)})
			}
			return
		}
	}
	if a == nil && b == nil {
		return
	}
	if sa, sb := show(a), show(b); sa != sb {
		*out = append(*out, FieldChange{Path: path, Old: sa, New: sb, Diff: math.NaN()})
	}
}

// show writes a JSON value back as JSON, "absent" for none.
func show(v any) string {
	if v == nil {
		return "absent"
	}
	b, err := json.Marshal(v)
	if err != nil {
		return fmt.Sprint(v)
	}
	return string(b)
}

// fieldsShown bounds the changed values listed per case.
const fieldsShown = 4

// WriteCorpusChanges writes what a regeneration changed for a reviewer:
// a count by kind with what each kind means, the changed cases by op, and
// then each changed case (the first casesShown) with its kind, its verdict
// under the profile and its first changed values (flips first, then the
// largest moves).
// casesShown is how many changed cases WriteCorpusChanges lists one by
// one: a reviewer reads that many; more means a generator change, which
// the counts by kind and op describe.
const casesShown = 200

func WriteCorpusChanges(w io.Writer, changes []CaseChange, total int, p *Profile) {
	if len(changes) == 0 {
		fmt.Fprintf(w, "no case changed (%d cases)\n", total)
		return
	}
	byKind := map[string]int{}
	byOp := map[string]int{}
	for _, c := range changes {
		byKind[c.Kind]++
		byOp[c.Op]++
	}
	fmt.Fprintf(w, "%d of %d cases changed (answers judged under the %s profile):\n", len(changes), total, p.Name)
	for _, k := range changeOrder {
		if n := byKind[k]; n > 0 {
			fmt.Fprintf(w, "  %d %s: %s\n", n, k, why[k])
		}
	}
	ops := make([]string, 0, len(byOp))
	for op := range byOp {
		ops = append(ops, op)
	}
	slices.Sort(ops)
	parts := make([]string, len(ops))
	for i, op := range ops {
		parts[i] = fmt.Sprintf("%s %d", op, byOp[op])
	}
	fmt.Fprintf(w, "  by op: %s\n", strings.Join(parts, ", "))
	for i, c := range changes {
		if i == casesShown {
			fmt.Fprintf(w, "… and %d more changed cases\n", len(changes)-casesShown)
			break
		}
		fmt.Fprintf(w, "%s (%s, %s): %s", c.ID, c.Op, c.Family, c.Kind)
		if c.Kind == ChangeFlipped || c.Kind == ChangeBeyond || c.Kind == ChangeRounding {
			fmt.Fprintf(w, ", %s under %s", c.Status, p.Name)
		}
		fs := slices.Clone(c.Fields)
		slices.SortStableFunc(fs, func(a, b FieldChange) int {
			if a.Flip() != b.Flip() {
				if a.Flip() {
					return -1
				}
				return 1
			}
			return cmp.Compare(b.Diff, a.Diff)
		})
		for i, f := range fs[:min(len(fs), fieldsShown)] {
			sep := "; "
			if i == 0 {
				sep = ": "
			}
			if f.Flip() {
				fmt.Fprintf(w, "%s%s %s → %s", sep, f.Path, f.Old, f.New)
			} else {
				fmt.Fprintf(w, "%s%s %s → %s (by %s)", sep, f.Path, f.Old, f.New, fmtF(f.Diff))
			}
		}
		if n := len(fs) - fieldsShown; n > 0 {
			fmt.Fprintf(w, "; and %d more", n)
		}
		fmt.Fprintln(w)
	}
}
