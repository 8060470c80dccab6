package audit_test

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"testing"

	"github.com/parquet-go/parquet-go"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/internal/testtool"
)

// duckdbRead reads a Parquet file with DuckDB's Node package and prints its
// column types and its rows as JSON (numbers as doubles, nulls as null).
const duckdbRead = `
const { DuckDBInstance } = require('@duckdb/node-api');
(async () => {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const file = process.argv[2].replace(/'/g, "''");
  const types = (await c.runAndReadAll("DESCRIBE SELECT * FROM read_parquet('" + file + "')")).getRowObjectsJson();
  const rows = (await c.runAndReadAll("SELECT * FROM read_parquet('" + file + "')")).getRowObjectsJson();
  process.stdout.write(JSON.stringify({types: types.map(t => [t.column_name, t.column_type]), rows}));
})().catch(e => { console.error(e); process.exit(1); });
`

// The labels-and-features table, read back by an independent reader
// (DuckDB's Node package from npm): the same rows, in order, with typed
// columns (doubles, strings; the optional ones nullable).
func TestParquetReadByDuckDB(t *testing.T) {
	node := testtool.NeedNodeModule(t, "@duckdb/node-api", "1.5.6-r.1")
	s := demo.Default()
	p := writeFleet(t, s, 0, 12)
	var pq bytes.Buffer
	tw, err := audit.NewTableWriter(nil, &pq)
	if err != nil {
		t.Fatal(err)
	}
	var want []audit.Row
	if _, err := audit.Run([]string{p}, audit.Options{Sets: demoSets(s), OnResult: func(r *audit.Result) error {
		rows := audit.Rows(r)
		want = append(want, rows...)
		return tw.Write(rows)
	}}); err != nil {
		t.Fatal(err)
	}
	if err := tw.Close(); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "labels.parquet")
	os.WriteFile(file, pq.Bytes(), 0o644)
	script := filepath.Join(t.TempDir(), "read.js")
	os.WriteFile(script, []byte(duckdbRead), 0o644)
	out, err := exec.Command(node, script, file).Output()
	if err != nil {
		t.Fatalf("duckdb: %v", err)
	}
	var got struct {
		Types [][2]string      `json:"types"`
		Rows  []map[string]any `json:"rows"`
	}
	if err := json.Unmarshal(out, &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Types) != len(audit.Columns) {
		t.Fatalf("DuckDB sees %d columns, want %d: %v", len(got.Types), len(audit.Columns), got.Types)
	}
	wantType := map[string]string{"request_id": "VARCHAR", "tags": "VARCHAR", "candidate_id": "VARCHAR", "ref_bucket": "VARCHAR",
		"phone_bucket": "VARCHAR", "verdict": "VARCHAR", "cause": "VARCHAR"}
	for i, ct := range got.Types {
		w := wantType[ct[0]]
		if w == "" {
			w = "DOUBLE"
		}
		if ct[0] != audit.Columns[i] || ct[1] != w {
			t.Errorf("column %d: %s %s, want %s %s", i, ct[0], ct[1], audit.Columns[i], w)
		}
	}
	if len(got.Rows) != len(want) || len(want) < 300 {
		t.Fatalf("DuckDB reads %d rows, want %d", len(got.Rows), len(want))
	}
	for i, w := range want {
		wb, _ := json.Marshal(w)
		var wm map[string]any
		json.Unmarshal(wb, &wm)
		for k, wv := range wm {
			gv := got.Rows[i][k]
			switch wv := wv.(type) {
			case float64:
				g, ok := gv.(float64)
				if !ok || g != wv && !(math.IsNaN(g) && math.IsNaN(wv)) {
					t.Fatalf("row %d %s: DuckDB %v, want %v", i, k, gv, wv)
				}
			default:
				if gv != wv {
					t.Fatalf("row %d %s: DuckDB %v (%T), want %v (%T)", i, k, gv, gv, wv, wv)
				}
			}
		}
	}
}

// A table longer than RowGroupRows is written in row groups of at most
// RowGroupRows rows (the bound NewTableWriter documents), every row kept:
// RowGroupRows + 1 rows make two groups, of RowGroupRows and 1 rows.
func TestTableRowGroups(t *testing.T) {
	var pq bytes.Buffer
	tw, err := audit.NewTableWriter(nil, &pq)
	if err != nil {
		t.Fatal(err)
	}
	rows := make([]audit.Row, audit.RowGroupRows+1)
	for i := range rows {
		rows[i].CandidateID = strconv.Itoa(i)
	}
	if err := tw.Write(rows); err != nil {
		t.Fatal(err)
	}
	if err := tw.Close(); err != nil {
		t.Fatal(err)
	}
	f, err := parquet.OpenFile(bytes.NewReader(pq.Bytes()), int64(pq.Len()))
	if err != nil {
		t.Fatal(err)
	}
	var got []int64
	for _, g := range f.RowGroups() {
		got = append(got, g.NumRows())
	}
	if want := []int64{audit.RowGroupRows, 1}; !slices.Equal(got, want) {
		t.Errorf("row groups of NewTableWriter(%d rows) = %v rows, want %v", len(rows), got, want)
	}
}
