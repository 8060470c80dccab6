package main

import (
	"strings"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/spec"
)

func newEvalCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "eval",
		Short: "Answer wire requests (JSON Lines) on stdin as the reference implementation",
		Long: `eval reads one JSON request a line on stdin and writes one answer a line on
stdout, in order (SPEC §6). A line that cannot be answered gets an error
object naming the line and the field, and the stream goes on. It exits 0 at
the end of input.

It speaks ` + spec.Version + `, with these ops (op hello lists them too):
` + wrapList(reference.Ops(), "  ", 78),
		Example: `  echo '{"op":"hello"}' | viewspec eval
  viewspec eval < requests.jsonl > answers.jsonl`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return reference.Serve(cmd.InOrStdin(), cmd.OutOrStdout())
		},
	}
}

// wrapList joins words with ", " into lines of at most width characters,
// each starting with indent.
func wrapList(words []string, indent string, width int) string {
	var b strings.Builder
	line := indent
	for i, w := range words {
		if i < len(words)-1 {
			w += ","
		}
		if line != indent && len(line)+1+len(w) > width {
			b.WriteString(line + "\n")
			line = indent
		}
		if line != indent {
			line += " "
		}
		line += w
	}
	b.WriteString(line)
	return b.String()
}
