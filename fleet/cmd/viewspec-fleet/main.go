// Command viewspec-fleet runs the display audit of drive logs (SPEC §9) as
// an Apache Beam pipeline, on Beam's Prism runner in this process by
// default, or on any runner Beam's --runner flag names:
//
//	viewspec-fleet --input 'logs/*.jsonl.gz' --rules rules/ --by client --output out/
//
// It writes summary.json (the bytes `viewspec audit --out` writes for the
// same logs), the labels-and-features table in Parquet shards, per-record
// verdicts and bad records in JSON Lines shards (see package fleet). Exit
// 0 when the job ran, 2 on unusable flags, 1 when the job failed.
package main

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"flag"
	"fmt"
	"os"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/x/beamx"

	"github.com/viewspec/viewspec/fleet"
)

// tags is a repeatable string flag.
type tags []string

func (t *tags) String() string     { return strings.Join(*t, ",") }
func (t *tags) Set(s string) error { *t = append(*t, s); return nil }

func main() {
	var by tags
	input := flag.String("input", "", "glob of drive logs (.jsonl, .jsonl.gz), local or on a file system Beam knows (gs://…)")
	rulesDir := flag.String("rules", "", "folder of rule sets (*.yaml) that records name by rules_ref")
	output := flag.String("output", "", "folder for summary.json and the shards (shared storage on a cluster)")
	flag.Var(&by, "by", "group by the record tag `TAG` (repeatable)")
	flag.Usage = func() {
		fmt.Fprintf(flag.CommandLine.Output(), "usage: viewspec-fleet --input GLOB --output DIR [--rules DIR] [--by TAG]... [Beam flags: --runner, --endpoint, …]\n")
		flag.PrintDefaults()
	}
	flag.Parse()
	beam.Init()
	if *input == "" || *output == "" {
		flag.Usage()
		os.Exit(2)
	}
	ctx := context.Background()
	if err := checkInput(ctx, *input); err != nil {
		fmt.Fprintln(os.Stderr, "viewspec-fleet:", err)
		os.Exit(2)
	}
	sets, err := fleet.ReadRules(*rulesDir)
	if err != nil {
		fmt.Fprintln(os.Stderr, "viewspec-fleet:", err)
		os.Exit(2)
	}
	var job [6]byte
	rand.Read(job[:])
	p, s := beam.NewPipelineWithRoot()
	fleet.Build(s, fleet.Config{Input: *input, Rules: sets, By: by, Output: *output, Job: hex.EncodeToString(job[:])})
	if err := beamx.Run(ctx, p); err != nil {
		fmt.Fprintln(os.Stderr, "viewspec-fleet: the job failed:", err)
		os.Exit(1)
	}
}

// checkInput says when the glob matches no file, before a job starts.
func checkInput(ctx context.Context, glob string) error {
	files, err := fleet.InputFiles(ctx, glob)
	if err != nil {
		return err
	}
	if len(files) == 0 {
		return fmt.Errorf("--input %s: no file matches", glob)
	}
	return nil
}
