// Package jsonl reads JSON Lines streams line by line, whatever the lines' length,
// with memory bounded by the longest line taken.
package jsonl

import (
	"bufio"
	"bytes"
	"errors"
	"io"
)

// EachLine calls fn with every non-blank line of r (trimmed; valid only
// during the call) and its 1-based number. A line longer than maxLineBytes
// is not read into memory: fn gets it with tooLong set and no bytes, and
// reading goes on. It stops at the first error fn returns, or a read error.
func EachLine(r io.Reader, maxLineBytes int, fn func(lineNo int, line []byte, tooLong bool) error) error {
	br := bufio.NewReaderSize(r, 64<<10)
	var long []byte
	for lineNo := 1; ; lineNo++ {
		line, err := br.ReadSlice('\n')
		tooLong := false
		if errors.Is(err, bufio.ErrBufferFull) {
			long = append(long[:0], line...)
			for errors.Is(err, bufio.ErrBufferFull) {
				line, err = br.ReadSlice('\n')
				if !tooLong && len(long)+len(line) > maxLineBytes {
					tooLong, long = true, long[:0]
				}
				if !tooLong {
					long = append(long, line...)
				}
			}
			line = long
		}
		if err != nil && err != io.EOF {
			return err
		}
		if tooLong {
			if ferr := fn(lineNo, nil, true); ferr != nil {
				return ferr
			}
		} else if t := bytes.TrimSpace(line); len(t) > 0 {
			if ferr := fn(lineNo, t, false); ferr != nil {
				return ferr
			}
		}
		if err == io.EOF {
			return nil
		}
	}
}
