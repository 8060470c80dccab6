package main

import (
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/reference"
)

func newEvalCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "eval",
		Short: "Answer wire requests (JSON Lines) on stdin as the reference implementation",
		Long: `eval reads one JSON request a line on stdin and writes one answer a line on
stdout, in order (SPEC §6). A line that cannot be answered gets an error
object naming the line and the field, and the stream goes on. It exits 0 at
the end of input.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return reference.Serve(cmd.InOrStdin(), cmd.OutOrStdout())
		},
	}
}
