package fleet

import (
	"context"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem/local" // local paths; the command adds the others
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"

	"github.com/viewspec/viewspec/audit"
)

// Config is one audit run.
type Config struct {
	// Input is a glob of drive logs (.jsonl, .jsonl.gz), on any file system
	// Beam knows (a local path, gs://…).
	Input string
	// Rules are the rule sets records name by rules_ref: name → YAML text.
	Rules map[string]string
	// By are the tags to group by.
	By []string
	// Output is the folder the results go to; every worker and the last
	// step write there, so on a cluster it is shared storage.
	Output string
	// Job names this run's temporary files, unique among runs writing to
	// Output at once.
	Job string
}

// ReadRules reads every *.yaml in dir as a rule set named by its base name
// (phone.yaml is "phone"), as `viewspec audit --rules` does, and checks that
// each parses; "" gives none.
func ReadRules(dir string) (map[string]string, error) {
	_, texts, err := audit.ReadRuleDir(dir)
	return texts, err
}

func init() {
	register.DoFn3x1[context.Context, string, func(string), error](&expandFn{})
	register.Emitter1[string]()
	register.DoFn5x1[context.Context, string, func(string, part), func(string), func(string), error](&auditFn{})
	register.Emitter2[string, part]()
	register.DoFn3x1[context.Context, string, func(string), error](&linesFn{})
	register.Combiner1[part](&mergeFn{})
	register.DoFn4x1[context.Context, []byte, func(*string, *part) bool, func(*string) bool, error](&finishFn{})
	register.Iter2[string, part]()
	register.Iter1[string]()
	registerPartCoder()
}

// Build adds the audit of cfg to the pipeline's root scope s.
//
//	glob → expand → reshuffle → audit ─┬─ parts ──→ CombinePerKey(merge) ─┐
//	                                   ├─ shards (labels, verdicts) ──────┤
//	                                   └─ bad records → lines ─ shards ───┴→ finish
//
// finish runs once, after everything else (its inputs are side inputs): it
// writes summary.json and renames the shards to their final names.
func Build(s beam.Scope, cfg Config) {
	s = s.Scope("viewspec.audit")
	files := beam.ParDo(s, &expandFn{}, beam.Create(s, cfg.Input))
	files = beam.Reshuffle(s, files)
	parts, shards, bad := beam.ParDo3(s, &auditFn{Rules: cfg.Rules, By: cfg.By, Output: cfg.Output, Job: cfg.Job}, files)
	badShards := beam.ParDo(s, &linesFn{Output: cfg.Output, Job: cfg.Job, Kind: "bad-records"}, bad)
	groups := beam.CombinePerKey(s, &mergeFn{}, parts)
	beam.ParDo0(s, &finishFn{By: cfg.By, Output: cfg.Output, Job: cfg.Job}, beam.Impulse(s),
		beam.SideInput{Input: groups}, beam.SideInput{Input: beam.Flatten(s, shards, badShards)})
}
