package fleet

import (
	"bufio"
	"context"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"io"
	"path"
	"sort"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem"

	"github.com/viewspec/viewspec/audit"
)

// Output kinds: each is written in shards named KIND-SSSSS-of-NNNNN.EXT.
var kinds = []struct{ name, ext string }{
	{"labels", ".parquet"},
	{"verdicts", ".jsonl"},
	{"bad-records", ".jsonl"},
}

// join joins a folder and a file name with a slash, keeping a scheme's
// double slash (gs://bucket/dir).
func join(dir, name string) string { return strings.TrimSuffix(dir, "/") + "/" + name }

// tmpDir is where the bundles of job write their shards before finish
// renames them.
func tmpDir(output, job string) string { return join(output, ".tmp-"+job) }

// shard is one output file a bundle writes, under a temporary name.
type shard struct {
	fs   filesystem.Interface
	name string
	f    io.WriteCloser
	w    *bufio.Writer
}

// openShard opens a new shard of kind (extension ext) for job, named at
// random so that bundles and their retries never share one.
func openShard(ctx context.Context, output, job, kind, ext string) (*shard, error) {
	var b [8]byte
	if _, err := rand.Read(b[:]); err != nil {
		return nil, err
	}
	name := join(tmpDir(output, job), kind+"-"+hex.EncodeToString(b[:])+ext)
	fs, err := filesystem.New(ctx, name)
	if err != nil {
		return nil, err
	}
	f, err := fs.OpenWrite(ctx, name)
	if err != nil {
		fs.Close()
		return nil, err
	}
	return &shard{fs: fs, name: name, f: f, w: bufio.NewWriterSize(f, 1<<16)}, nil
}

func (s *shard) writeLine(b []byte) error {
	if _, err := s.w.Write(b); err != nil {
		return err
	}
	return s.w.WriteByte('\n')
}

func (s *shard) close() error {
	err := s.w.Flush()
	if cerr := s.f.Close(); err == nil {
		err = cerr
	}
	s.fs.Close()
	return err
}

// linesFn writes lines into one shard of Kind per bundle and emits the
// shard's temporary name when the bundle ends.
type linesFn struct {
	Output, Job, Kind string

	sh *shard
}

func (f *linesFn) ProcessElement(ctx context.Context, line string, _ func(string)) error {
	if f.sh == nil {
		var err error
		if f.sh, err = openShard(ctx, f.Output, f.Job, f.Kind, ".jsonl"); err != nil {
			return err
		}
	}
	return f.sh.writeLine([]byte(line))
}

func (f *linesFn) FinishBundle(_ context.Context, emit func(string)) error {
	if f.sh == nil {
		return nil
	}
	err := f.sh.close()
	if err == nil {
		emit(f.sh.name)
	}
	f.sh = nil
	return err
}

// finishFn is the last step: it merges the groups' parts into totals,
// writes summary.json, and gives the shards of the bundles that succeeded
// their final names (replacing the shards of an earlier run in Output);
// what failed bundles left behind is removed.
type finishFn struct {
	By          []string
	Output, Job string
}

func (f *finishFn) ProcessElement(ctx context.Context, _ []byte, groups func(*string, *part) bool, shards func(*string) bool) error {
	ps := map[string]*part{}
	var key string
	var p part
	for groups(&key, &p) {
		if cur, ok := ps[key]; ok {
			cur.merge(&p)
		} else {
			q := p
			ps[key] = &q
		}
		p = part{}
	}
	sum := totals(f.By, ps).Summary()
	b, err := audit.SummaryJSON(&sum)
	if err != nil {
		return err
	}
	fs, err := filesystem.New(ctx, f.Output)
	if err != nil {
		return err
	}
	defer fs.Close()
	if err := filesystem.Write(ctx, fs, join(f.Output, "summary.json"), b); err != nil {
		return err
	}

	byKind := map[string][]string{}
	var name string
	for shards(&name) {
		base := path.Base(name)
		for _, k := range kinds {
			if strings.HasPrefix(base, k.name+"-") {
				byKind[k.name] = append(byKind[k.name], name)
			}
		}
	}
	for _, k := range kinds {
		old, err := fs.List(ctx, join(f.Output, k.name+"-*-of-*"+k.ext))
		if err != nil {
			return err
		}
		for _, o := range old {
			if err := remove(ctx, fs, o); err != nil {
				return err
			}
		}
		names := byKind[k.name]
		sort.Strings(names)
		for i, n := range names {
			final := join(f.Output, fmt.Sprintf("%s-%05d-of-%05d%s", k.name, i, len(names), k.ext))
			if err := filesystem.Rename(ctx, fs, n, final); err != nil {
				return err
			}
		}
	}
	// Shards of failed or retried bundles, never renamed.
	tmp := tmpDir(f.Output, f.Job)
	left, err := fs.List(ctx, join(tmp, "*"))
	if err != nil {
		return err
	}
	for _, l := range left {
		if err := remove(ctx, fs, l); err != nil {
			return err
		}
	}
	remove(ctx, fs, tmp) // an empty folder where folders exist; nothing elsewhere
	return nil
}

// remove removes a file where the file system can.
func remove(ctx context.Context, fs filesystem.Interface, name string) error {
	if r, ok := fs.(filesystem.Remover); ok {
		return r.Remove(ctx, name)
	}
	return nil
}
