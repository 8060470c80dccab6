package main

import (
	"io"
	"os"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"
)

// terminal returns the command's stderr when it is a terminal, where
// progress bars go; nil otherwise (a pipe, a file, a test), where they
// would only be noise.
func terminal(cmd *cobra.Command) *os.File {
	if f, ok := cmd.ErrOrStderr().(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		return f
	}
	return nil
}

// countBar returns a progress callback that draws a bar of done out of
// total on a terminal, and does nothing elsewhere.
func countBar(cmd *cobra.Command, desc string) func(done, total int) {
	f := terminal(cmd)
	if f == nil {
		return nil
	}
	var bar *progressbar.ProgressBar
	return func(done, total int) {
		if bar == nil {
			bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(f),
				progressbar.OptionSetDescription(desc), progressbar.OptionShowCount(),
				progressbar.OptionClearOnFinish())
		}
		bar.Set(done)
	}
}

// readingBar wraps the file r (of name) in a reader that draws a bar of the
// bytes read on a terminal; elsewhere it returns r as it is.
func readingBar(cmd *cobra.Command, r *os.File, desc string) io.Reader {
	f := terminal(cmd)
	st, err := r.Stat()
	if f == nil || err != nil || !st.Mode().IsRegular() || st.Size() < 1<<20 {
		return r
	}
	bar := progressbar.NewOptions64(st.Size(), progressbar.OptionSetWriter(f),
		progressbar.OptionSetDescription(desc), progressbar.OptionShowBytes(true),
		progressbar.OptionClearOnFinish())
	pr := progressbar.NewReader(r, bar)
	return &pr
}
