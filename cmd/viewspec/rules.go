package main

import (
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/rules"
)

func newRulesCmd() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "rules",
		Short: "Check speed-driven zoom and pitch rule sets",
	}
	cmd.AddCommand(newRulesLintCmd(), newRulesDiffCmd())
	return cmd
}

func newRulesLintCmd() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:   "lint FILE...",
		Short: "Report errors and warnings in rule files, with line and column",
		Long: `lint reads rule files (YAML, or JSON, SPEC §3) and reports every problem with
its file, line and column: errors (unsorted or overlapping bands, missing or
non-finite fields, rates ≤ 0, zoom outside [0, 30], pitch outside [0, 90))
and warnings (zoom rising with speed, a hysteresis wider than a band, a turn
zoom that can never act). It exits 1 when any file has an error.`,
		Example: `  viewspec rules lint fixtures/rules/phone.yaml fixtures/rules/incar.yaml`,
		Args:    cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			out := cmd.OutOrStdout()
			var all []rules.Finding
			errorsSeen := 0
			for _, name := range args {
				data, err := os.ReadFile(name)
				if err != nil {
					return &exitError{2, err}
				}
				fs := rules.Lint(data, name)
				for _, f := range fs {
					if f.Severity == rules.SeverityError {
						errorsSeen++
					}
				}
				all = append(all, fs...)
			}
			if asJSON {
				if all == nil {
					all = []rules.Finding{}
				}
				if err := writeJSON(out, all); err != nil {
					return err
				}
			} else {
				for _, f := range all {
					fmt.Fprintln(out, f)
				}
				if len(all) == 0 {
					fmt.Fprintf(out, "%d file(s) clean\n", len(args))
				}
			}
			if errorsSeen > 0 {
				return &exitError{1, fmt.Errorf("%d error(s)", errorsSeen)}
			}
			return nil
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the findings as a JSON array")
	return cmd
}

// readRules reads and checks a rule file; problems exit with code 2.
func readRules(name string) (*rules.Set, error) {
	if name == "" {
		return nil, &exitError{2, fmt.Errorf("--rules FILE is required")}
	}
	data, err := os.ReadFile(name)
	if err != nil {
		return nil, &exitError{2, err}
	}
	rs, err := rules.Parse(data, name)
	if err != nil {
		return nil, &exitError{2, err}
	}
	return rs, nil
}
