package fleet

import (
	"context"
	"encoding/json"
	"fmt"
	"sort"

	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/rules"
)

// expandFn turns the input glob into the log files it matches, in name
// order.
type expandFn struct{}

func (expandFn) ProcessElement(ctx context.Context, glob string, emit func(string)) error {
	files, err := InputFiles(ctx, glob)
	if err != nil {
		return err
	}
	for _, f := range files {
		emit(f)
	}
	return nil
}

// InputFiles returns the log files the input glob matches, in name order,
// from whichever file system Beam has for the glob's scheme.
func InputFiles(ctx context.Context, glob string) ([]string, error) {
	fs, err := filesystem.New(ctx, glob)
	if err != nil {
		return nil, err
	}
	defer fs.Close()
	files, err := fs.List(ctx, glob)
	if err != nil {
		return nil, err
	}
	sort.Strings(files)
	return files, nil
}

// auditFn audits whole log files. Per bundle it keeps one audit.Totals (the
// accumulator `viewspec audit` keeps) and one shard of each table, and when
// the bundle ends emits the totals per group (parts) and the shards'
// temporary names; bad records go out one by one as JSON lines.
type auditFn struct {
	Rules  map[string]string // name → YAML
	By     []string
	Output string
	Job    string

	sets   audit.RuleSets
	tot    *audit.Totals
	labels *shard
	table  *audit.TableWriter
	verds  *shard
}

// auditLine is audit.AuditLine; tests replace it to plant a panic.
var auditLine = audit.AuditLine

func (f *auditFn) Setup() error {
	f.sets = audit.RuleSets{}
	for name, text := range f.Rules {
		set, err := rules.Parse([]byte(text), name+".yaml")
		if err != nil {
			return err
		}
		f.sets[name] = set
	}
	return nil
}

func (f *auditFn) StartBundle(context.Context, func(string, part), func(string), func(string)) {
	f.tot = audit.NewTotals(f.By)
}

func (f *auditFn) ProcessElement(ctx context.Context, file string, _ func(string, part), _ func(string), emitBad func(string)) error {
	fs, err := filesystem.New(ctx, file)
	if err != nil {
		return err
	}
	defer fs.Close()
	r, err := fs.OpenRead(ctx, file)
	if err != nil {
		return err
	}
	defer r.Close()
	return audit.ReadLog(r, file, func(l audit.LogLine) error {
		bad := l.Bad
		if bad == nil {
			var err error
			if bad, err = f.record(ctx, l); err != nil {
				return err
			}
		}
		if bad != nil {
			f.tot.BadRecords++
			b, err := json.Marshal(bad)
			if err != nil {
				return err
			}
			emitBad(string(b))
		}
		return nil
	})
}

// record audits one line and accounts it; the bad record it is, or nil.
// A panic anywhere in the account (the audit, the table's rows, the
// verdict, the tally) makes the line a bad record naming the panic, never
// a failed bundle; the totals take the record last, so a record that
// panics is never half counted (its rows may be in the table). A write
// error is the bundle's and fails it, for the runner to retry.
func (f *auditFn) record(ctx context.Context, l audit.LogLine) (bad *audit.BadRecord, err error) {
	res, bad := safeAudit(l, f.sets)
	if bad != nil {
		return bad, nil
	}
	defer func() {
		if p := recover(); p != nil {
			bad = &audit.BadRecord{File: l.File, Line: l.Line, RequestID: res.Record.RequestID,
				Reason: fmt.Sprintf("the audit failed on this record: %v", p)}
		}
	}()
	if err := f.write(ctx, l, res); err != nil {
		return nil, err
	}
	f.tot.Add(res)
	return nil, nil
}

// safeAudit is auditLine with a panic turned into a bad record (AuditLine
// does so itself; this guards a replaced one as well).
func safeAudit(l audit.LogLine, sets audit.RuleSets) (res *audit.Result, bad *audit.BadRecord) {
	defer func() {
		if p := recover(); p != nil {
			res, bad = nil, &audit.BadRecord{File: l.File, Line: l.Line, RequestID: requestID(l.Data),
				Reason: fmt.Sprintf("the audit failed on this record: %v", p)}
		}
	}()
	return auditLine(l.File, l.Line, l.Data, sets)
}

// requestID returns the line's request_id when it has a readable one.
func requestID(data []byte) string {
	var r struct {
		ID string `json:"request_id"`
	}
	if json.Unmarshal(data, &r) != nil {
		return ""
	}
	return r.ID
}

// write appends the record's rows and verdict line to this bundle's
// shards, opening them on the first record.
func (f *auditFn) write(ctx context.Context, l audit.LogLine, res *audit.Result) error {
	if f.labels == nil {
		var err error
		if f.labels, err = openShard(ctx, f.Output, f.Job, "labels", ".parquet"); err != nil {
			return err
		}
		if f.table, err = audit.NewTableWriter(nil, f.labels.w); err != nil {
			return err
		}
		if f.verds, err = openShard(ctx, f.Output, f.Job, "verdicts", ".jsonl"); err != nil {
			return err
		}
	}
	if err := f.table.Write(audit.Rows(res)); err != nil {
		return err
	}
	return f.verds.writeLine(VerdictOf(l.File, l.Line, res))
}

func (f *auditFn) FinishBundle(ctx context.Context, emitPart func(string, part), emitShard func(string), _ func(string)) error {
	if f.labels != nil {
		if err := f.table.Close(); err != nil {
			return err
		}
		for _, s := range []*shard{f.labels, f.verds} {
			if err := s.close(); err != nil {
				return err
			}
			emitShard(s.name)
		}
		f.labels, f.table, f.verds = nil, nil, nil
	}
	for key, p := range parts(f.tot) {
		emitPart(key, *p)
	}
	f.tot = nil
	return nil
}
