package fleet

import (
	"encoding/json"
	"reflect"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"

	"github.com/viewspec/viewspec/audit"
)

// part is a partial account of one group: its exact tally, and for the
// whole run the bad records. Parts merge in any order and grouping to the
// same part (SPEC §9).
type part struct {
	Tally audit.Tally
	Bad   int64
}

// merge adds o into p.
func (p *part) merge(o *part) {
	p.Tally.Merge(&o.Tally)
	p.Bad += o.Bad
}

// Group keys: the whole run, and one per value of each --by tag.
const allKey = "all"

// groupKey returns the key of the group of records whose tag has value.
func groupKey(tag, value string) string { return "by\x00" + tag + "\x00" + value }

// splitKey returns the tag and value of a group key; ok is false for allKey.
func splitKey(key string) (tag, value string, ok bool) {
	rest, found := strings.CutPrefix(key, "by\x00")
	if !found {
		return "", "", false
	}
	tag, value, ok = strings.Cut(rest, "\x00")
	return tag, value, ok
}

// parts returns tot's tallies by group key.
func parts(tot *audit.Totals) map[string]*part {
	m := map[string]*part{allKey: {Tally: tot.All, Bad: tot.BadRecords}}
	for tag, vals := range tot.Groups {
		for v, t := range vals {
			m[groupKey(tag, v)] = &part{Tally: *t}
		}
	}
	return m
}

// totals returns the totals grouped by by that the parts make.
func totals(by []string, ps map[string]*part) *audit.Totals {
	tot := audit.NewTotals(by)
	for key, p := range ps {
		if tag, v, ok := splitKey(key); ok {
			if tot.Groups[tag] == nil {
				tot.Groups[tag] = map[string]*audit.Tally{}
			}
			t := p.Tally
			tot.Groups[tag][v] = &t
			continue
		}
		tot.All.Merge(&p.Tally)
		tot.BadRecords += p.Bad
	}
	return tot
}

// mergeFn is the combiner of a group's parts: the accumulator is the part
// itself, merged with audit.Tally.Merge.
type mergeFn struct{}

// MergeAccumulators adds b into a.
func (mergeFn) MergeAccumulators(a, b part) part {
	a.merge(&b)
	return a
}

// The part coder: JSON of the tally. Every field of a tally is an integer
// (counts, and sums as 128-bit fixed point in two integers) or a string, so
// the round trip is exact.
func registerPartCoder() {
	beam.RegisterCoder(reflect.TypeOf(part{}), encodePart, decodePart)
}

func encodePart(p part) ([]byte, error) { return json.Marshal(p) }

func decodePart(b []byte) (part, error) {
	var p part
	err := json.Unmarshal(b, &p)
	return p, err
}
