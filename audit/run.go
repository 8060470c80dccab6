package audit

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"sync"

	"github.com/viewspec/viewspec/internal/jsonl"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// MaxRecordBytes is the longest drive-log line the audit reads; a longer
// one is a bad record.
const MaxRecordBytes = 64 << 20

// BadRecord is a drive-log line the audit could not use: where it is and
// why, naming the field.
type BadRecord struct {
	File      string `json:"file"`
	Line      int    `json:"line"`
	RequestID string `json:"request_id,omitempty"`
	Field     string `json:"field,omitempty"`
	Reason    string `json:"reason"`
}

func (b *BadRecord) Error() string {
	s := fmt.Sprintf("%s:%d: ", b.File, b.Line)
	if b.RequestID != "" {
		s += "request " + b.RequestID + ": "
	}
	return s + b.Reason
}

// Options steer Run.
type Options struct {
	Sets    RuleSets // rules_ref → rule set
	By      []string // tags to group by
	Workers int      // records audited at once; 0: one per core
	// OnResult, when set, gets every audited record in input order (files
	// in the order given, lines in file order), from one goroutine.
	OnResult func(*Result) error
	// OnBad, when set, gets every bad record in input order.
	OnBad func(*BadRecord)
	// OnBytes, when set, gets the compressed bytes read so far of the
	// current file, for a progress bar.
	OnBytes func(file string, n int64)
}

// batchPerWorker is how many records each worker holds at once: memory is
// bounded by Workers × batchPerWorker records whatever the logs' size.
const batchPerWorker = 16

// Run audits the drive logs files (JSON Lines, plain or gzip) and returns
// the totals. A bad record is reported (OnBad), counted and skipped; only a
// file that cannot be opened, or an OnResult error, stops the run. The
// totals and the order of the callbacks do not depend on Workers.
func Run(files []string, opt Options) (*Totals, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	tot := NewTotals(opt.By)
	type item struct {
		file string
		line int
		data []byte
		res  *Result
		bad  *BadRecord
	}
	batch := make([]item, 0, workers*batchPerWorker)
	flush := func() error {
		var wg sync.WaitGroup
		for w := range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := w; i < len(batch); i += workers {
					it := &batch[i]
					if it.bad == nil {
						it.res, it.bad = AuditLine(it.file, it.line, it.data, opt.Sets)
					}
				}
			}()
		}
		wg.Wait()
		for i := range batch {
			it := &batch[i]
			if it.bad != nil {
				tot.BadRecords++
				if opt.OnBad != nil {
					opt.OnBad(it.bad)
				}
				continue
			}
			tot.Add(it.res)
			if opt.OnResult != nil {
				if err := opt.OnResult(it.res); err != nil {
					return err
				}
			}
		}
		batch = batch[:0]
		return nil
	}
	for _, name := range files {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		var r io.Reader = f
		if opt.OnBytes != nil {
			r = &countingReader{r: f, fn: func(n int64) { opt.OnBytes(name, n) }}
		}
		err = ReadLog(r, name, func(l LogLine) error {
			batch = append(batch, item{file: l.File, line: l.Line, data: append([]byte(nil), l.Data...), bad: l.Bad})
			if len(batch) == cap(batch) {
				return flush()
			}
			return nil
		})
		f.Close()
		if err != nil {
			return nil, err
		}
		if err := flush(); err != nil {
			return nil, err
		}
	}
	return tot, nil
}

// LogLine is one line of a drive log as ReadLog gives it: where it is, its
// bytes (trimmed; valid only during the call), and, when the line cannot be
// a record, the bad record it is (Data is then empty).
type LogLine struct {
	File string
	Line int
	Data []byte
	Bad  *BadRecord
}

// ReadLog reads one drive log from r (JSON Lines, plain or gzip: gunzipped
// when it starts with gzip's magic bytes 1f 8b) and calls fn with each
// non-blank line in order; file names the log in bad records. A line longer
// than MaxRecordBytes is passed as a bad record and reading goes on; a read
// error (a truncated gzip, an I/O fault) is passed as a bad record at the
// line after the last one read, and ends the log: the lines before it count
// (SPEC §9). Only an error of fn stops ReadLog and is returned.
func ReadLog(r io.Reader, file string, fn func(LogLine) error) error {
	last := 0
	err := readLines(r, func(line int, data []byte, tooLong bool) error {
		last = line
		l := LogLine{File: file, Line: line, Data: data}
		if tooLong {
			l.Bad = &BadRecord{File: file, Line: line, Reason: fmt.Sprintf("line longer than %d bytes", MaxRecordBytes)}
		}
		if err := fn(l); err != nil {
			return stopError{err}
		}
		return nil
	})
	if err == nil {
		return nil
	}
	var stop stopError
	if errors.As(err, &stop) {
		return stop.err
	}
	return fn(LogLine{File: file, Line: last + 1,
		Bad: &BadRecord{File: file, Line: last + 1, Reason: "the file breaks off here: " + err.Error()}})
}

// stopError carries an error of the caller's callback out of the reader,
// apart from read errors.
type stopError struct{ err error }

func (s stopError) Error() string { return s.err.Error() }

// readLines reads the lines of one log, gunzipping it when it starts with
// gzip's magic bytes.
func readLines(r io.Reader, fn func(int, []byte, bool) error) error {
	br := bufio.NewReaderSize(r, 64<<10)
	if magic, _ := br.Peek(2); bytes.Equal(magic, []byte{0x1f, 0x8b}) {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return err
		}
		defer zr.Close()
		r = zr
	} else {
		r = br
	}
	return jsonl.EachLine(r, MaxRecordBytes, fn)
}

type countingReader struct {
	r  io.Reader
	n  int64
	fn func(int64)
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	c.fn(c.n)
	return n, err
}

// AuditLine decodes and audits one drive-log line, data, found at line of
// file (for the report): the record's result, or the bad record it is,
// naming the field. A record that panics the audit is a bad record naming
// the panic and the request id, never a crash. Run audits every line with
// it; an engine that spreads the lines over workers calls it the same way.
func AuditLine(file string, line int, data []byte, sets RuleSets) (res *Result, bad *BadRecord) {
	id := requestID(data)
	defer func() {
		if p := recover(); p != nil {
			res, bad = nil, &BadRecord{File: file, Line: line, RequestID: id, Reason: fmt.Sprintf("the audit failed on this record: %v", p)}
		}
	}()
	rec, err := DecodeRecord(data, sets)
	if err == nil {
		res, err = Audit(rec)
	}
	if err != nil {
		b := &BadRecord{File: file, Line: line, RequestID: id}
		var fe *spec.FieldError
		if errors.As(err, &fe) {
			b.Field, b.Reason = fe.Field, fe.Error()
		} else {
			_, b.Reason = wire.DecodeError(err)
		}
		return nil, b
	}
	return res, nil
}

// requestID returns the line's request_id when it has a readable one.
func requestID(data []byte) string {
	var r struct {
		ID string `json:"request_id"`
	}
	if wire.Unmarshal(data, &r) != nil {
		return ""
	}
	return r.ID
}
