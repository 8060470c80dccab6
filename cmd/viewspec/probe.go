package main

import (
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/probe"
	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/spec"
)

func newProbeCmd() *cobra.Command {
	var impl, opsList, profile, out string
	var checks int
	var seed uint64
	var timeout, shrink time.Duration
	cmd := &cobra.Command{
		Use:   "probe --impl 'CMD'",
		Short: "Hunt for a disagreement nobody wrote a fixture for, and shrink it to a minimal case",
		Long: `probe draws cases of every op the implementation speaks (cameras, routes,
markers and rule sets biased toward the edges), asks the implementation and
the reference, and compares them under the profile's tolerances and the
reference's decision margins. At the first failure it shrinks the case to a
minimal one (fewest points, markers and vertices; round numbers: pitch 0,
heading 0, an integral zoom where the bug allows), prints it with both answers
and what differs, writes it as a one-line corpus that 'viewspec run' replays,
and exits 1. A crash or a hang of the implementation is a finding too. The
same seed draws the same cases.`,
		Example: `  viewspec probe --impl 'python3 fixtures/examples/python/viewspec_py.py --mistake heading-ccw'
  viewspec probe --impl './server --wire' --ops project,footprint --checks 5000 --seed 42`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if impl == "" {
				return &exitError{2, fmt.Errorf("--impl 'CMD' is required")}
			}
			p, err := check.LoadProfile(profile, "")
			if err != nil {
				return &exitError{2, err}
			}
			var ops []string
			if opsList != "" {
				only, err := corpus.OpsIn(opsList)
				if err != nil {
					return &exitError{2, fmt.Errorf("--ops: %v", err)}
				}
				for _, op := range reference.Ops() {
					if only[op] {
						ops = append(ops, op)
					}
				}
			}
			proc := probe.NewCommand(impl, timeout)
			defer proc.Close()
			stderr := cmd.ErrOrStderr()
			f, err := probe.Find(proc, probe.Options{Ops: ops, Checks: checks, Seed: seed, Profile: p, ShrinkTime: shrink,
				Log: func(format string, args ...any) { fmt.Fprintf(stderr, "probe: "+format+"\n", args...) }})
			if err != nil {
				return &exitError{2, err}
			}
			w := cmd.OutOrStdout()
			if f == nil {
				fmt.Fprintf(w, "no disagreement in %d cases per op (seed %d, %s profile)\n", checks, seed, p.Name)
				return nil
			}
			printFinding(w, f)
			if err := corpus.WriteFileAtomic(out, func(w io.Writer) error {
				b, err := corpus.CaseLine(f.Case)
				if err != nil {
					return err
				}
				_, err = w.Write(b)
				return err
			}); err != nil {
				return &exitError{2, err}
			}
			fmt.Fprintf(w, "\nthe minimal case is in %s; replay it with:\n  viewspec run %s --impl %q\n", out, out, impl)
			return &exitError{1, fmt.Errorf("%s: disagreement found", f.Op)}
		},
	}
	cmd.Flags().StringVar(&impl, "impl", "", "the implementation's command line, run with sh -c")
	cmd.Flags().StringVar(&opsList, "ops", "", "only these ops, comma-separated (default: every op it speaks)")
	cmd.Flags().IntVar(&checks, "checks", 1000, "cases to draw per op")
	cmd.Flags().Uint64Var(&seed, "seed", 1, "random seed (the same seed draws the same cases)")
	cmd.Flags().StringVar(&profile, "profile", "strict", "tolerance profile: strict or field")
	cmd.Flags().StringVarP(&out, "output", "o", "probe-finding.jsonl", "where to write the minimal case (one-line corpus)")
	cmd.Flags().DurationVar(&timeout, "timeout", 5*time.Second, "how long to wait for each answer")
	cmd.Flags().DurationVar(&shrink, "shrink-time", 30*time.Second, "how long to spend shrinking at most")
	return cmd
}

// printFinding shows a minimal case, both answers and what differs.
func printFinding(w io.Writer, f *probe.Disagreement) {
	fmt.Fprintf(w, "DISAGREEMENT in op %s (family %s), found after %d case(s) and shrunk:\n\n", f.Op, f.Family, f.Checks)
	fmt.Fprintf(w, "request:\n  %s\n", f.Case.Request)
	fmt.Fprintf(w, "reference answers:\n  %s\n", f.Case.Expect)
	if f.Err != "" {
		fmt.Fprintf(w, "implementation: %s\n", f.Err)
		return
	}
	fmt.Fprintf(w, "implementation answers:\n  %s\n", f.Got)
	fmt.Fprintln(w, "differences:")
	for _, d := range f.Diffs {
		line := fmt.Sprintf("  %s: got %s, want %s", d.Path, d.Got, d.Want)
		if d.Diff > 0 {
			line += fmt.Sprintf(" (off by %s, %s tolerance %s)", spec.FormatNumber(d.Diff), d.Quantity, spec.FormatNumber(d.Allowed))
		} else if d.Quantity != "shape" {
			line += fmt.Sprintf(" (%s decision)", d.Quantity)
		}
		if d.Note != "" {
			line += " — " + d.Note
		}
		fmt.Fprintln(w, strings.TrimRight(line, " "))
	}
}
