package demo

import (
	_ "embed"

	"github.com/viewspec/viewspec/rules"
)

// The rule files are byte-for-byte copies of fixtures/rules/phone.yaml and incar.yaml (go:embed
// cannot reach outside this folder); a test checks that they still are.
var (
	//go:embed rules/phone.yaml
	phoneYAML []byte
	//go:embed rules/incar.yaml
	inCarYAML []byte
)

// The rule sets' names.
const (
	RulesPhone = "phone"
	RulesInCar = "incar"
)

// RuleSet is a zoom and pitch rule set (SPEC §3) as the scenario carries it: its name, the file it
// came from, the file's text and the parsed set.
type RuleSet struct {
	Name string
	File string // base name: phone.yaml, incar.yaml
	YAML []byte
	Set  *rules.Set
}

// newRuleSets parses the embedded rule files. They are part of the package, so a parse error is a
// broken build, not an input error: it panics.
func newRuleSets() []RuleSet {
	out := []RuleSet{
		{Name: RulesPhone, File: "phone.yaml", YAML: phoneYAML},
		{Name: RulesInCar, File: "incar.yaml", YAML: inCarYAML},
	}
	for i := range out {
		set, err := rules.Parse(out[i].YAML, out[i].File)
		if err != nil {
			panic("demo: embedded rule file: " + err.Error())
		}
		out[i].YAML = append([]byte(nil), out[i].YAML...)
		out[i].Set = set
	}
	return out
}
