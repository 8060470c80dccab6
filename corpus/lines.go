package corpus

import (
	"io"

	"github.com/viewspec/viewspec/internal/jsonl"
)

// EachLine calls fn with every non-blank line of r (trimmed; valid only
// during the call) and its 1-based number. A line longer than MaxLineBytes
// is not read into memory: fn gets it with tooLong set and no bytes, and
// reading goes on. It stops at the first error fn returns, or a read error.
func EachLine(r io.Reader, fn func(lineNo int, line []byte, tooLong bool) error) error {
	return jsonl.EachLine(r, MaxLineBytes, fn)
}
