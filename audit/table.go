package audit

import (
	"encoding/csv"
	"encoding/json"
	"io"
	"strconv"

	"github.com/parquet-go/parquet-go"
)

// Row is one candidate of the labels-and-features table (SPEC §9): who, the
// features at request time, and the outcomes by the reference and by the
// phone. Units are in the column names; optional columns are null where the
// value does not exist.
type Row struct {
	RequestID        string   `parquet:"request_id" json:"request_id"`
	Tags             string   `parquet:"tags" json:"tags"` // the record's tags as a JSON object
	CandidateID      string   `parquet:"candidate_id" json:"candidate_id"`
	Priority         float64  `parquet:"priority" json:"priority"`
	UserDistM        float64  `parquet:"user_dist_m" json:"user_dist_m"`
	RouteDistM       *float64 `parquet:"route_dist_m,optional" json:"route_dist_m"`
	AlongM           *float64 `parquet:"along_m,optional" json:"along_m"`
	EtaS             *float64 `parquet:"eta_s,optional" json:"eta_s"`
	ViewDistM        *float64 `parquet:"view_dist_m,optional" json:"view_dist_m"`
	FootprintAreaM2  float64  `parquet:"footprint_area_m2" json:"footprint_area_m2"`
	VisibleRadiusM   float64  `parquet:"visible_radius_m" json:"visible_radius_m"`
	AspectRatio      float64  `parquet:"aspect_ratio" json:"aspect_ratio"`
	SpeedMps         float64  `parquet:"speed_mps" json:"speed_mps"`
	RefBucket        string   `parquet:"ref_bucket,dict" json:"ref_bucket"`
	PhoneBucket      string   `parquet:"phone_bucket,dict" json:"phone_bucket"`
	RefFirstShownS   *float64 `parquet:"ref_first_shown_s,optional" json:"ref_first_shown_s"`
	PhoneFirstShownS *float64 `parquet:"phone_first_shown_s,optional" json:"phone_first_shown_s"`
	RefShownS        float64  `parquet:"ref_shown_s" json:"ref_shown_s"`
	PhoneShownS      float64  `parquet:"phone_shown_s" json:"phone_shown_s"`
	Verdict          string   `parquet:"verdict,dict" json:"verdict"`
	Cause            string   `parquet:"cause,dict" json:"cause"`
	PEarly           *float64 `parquet:"p_early,optional" json:"p_early"`
	PMid             *float64 `parquet:"p_mid,optional" json:"p_mid"`
	PLate            *float64 `parquet:"p_late,optional" json:"p_late"`
	PNever           *float64 `parquet:"p_never,optional" json:"p_never"`
}

// Columns are the table's column names, in order.
var Columns = []string{"request_id", "tags", "candidate_id", "priority", "user_dist_m", "route_dist_m", "along_m",
	"eta_s", "view_dist_m", "footprint_area_m2", "visible_radius_m", "aspect_ratio", "speed_mps", "ref_bucket",
	"phone_bucket", "ref_first_shown_s", "phone_first_shown_s", "ref_shown_s", "phone_shown_s", "verdict", "cause",
	"p_early", "p_mid", "p_late", "p_never"}

// Rows returns the table's rows of one audited record, in candidate order.
func Rows(r *Result) []Row {
	tags := map[string]string{}
	for _, t := range r.Record.Tags {
		tags[t.Key] = t.Value
	}
	tb, _ := json.Marshal(tags) // string keys and values: cannot fail
	rows := make([]Row, len(r.Outcomes))
	for i := range r.Outcomes {
		o := &r.Outcomes[i]
		f := &o.Features
		row := Row{RequestID: r.Record.RequestID, Tags: string(tb), CandidateID: o.ID, Priority: f.PriorityOfMarker,
			UserDistM: f.UserDistM, RouteDistM: f.RouteDistM, AlongM: f.AlongM, EtaS: f.EtaS, ViewDistM: f.ViewDistM,
			FootprintAreaM2: f.FootprintAreaM2, VisibleRadiusM: f.VisibleRadiusM, AspectRatio: f.AspectRatio,
			SpeedMps: f.SpeedMps, RefBucket: o.Ref.Bucket.String(), PhoneBucket: o.PhoneBucket.String(),
			RefShownS: o.Ref.ShownS, Verdict: o.Verdict.String(), Cause: o.Cause}
		if o.Ref.Shown {
			v := o.Ref.FirstShownS
			row.RefFirstShownS = &v
		}
		if o.Phone != nil {
			v := o.Phone.FirstShownS
			row.PhoneFirstShownS, row.PhoneShownS = &v, o.Phone.ShownS
		}
		if p := o.Predicted; p != nil {
			row.PEarly, row.PMid, row.PLate, row.PNever = &p[0], &p[1], &p[2], &p[3]
		}
		rows[i] = row
	}
	return rows
}

// TableWriter writes the labels-and-features table as CSV and Parquet at
// once, streaming: memory holds one row group, not the table.
type TableWriter struct {
	csv *csv.Writer
	pq  *parquet.GenericWriter[Row]
	rec []string
}

// RowGroupRows is how many rows a Parquet row group of the table holds at
// most: the writer holds one row group in memory and writes it out when it
// is full, so a table of any length is written in bounded memory.
const RowGroupRows = 1 << 16

// NewTableWriter writes CSV (with a header line) to csvW and Parquet
// (zstd-compressed, row groups of at most RowGroupRows rows) to pqW; either
// may be nil.
func NewTableWriter(csvW, pqW io.Writer) (*TableWriter, error) {
	t := &TableWriter{}
	if csvW != nil {
		t.csv = csv.NewWriter(csvW)
		if err := t.csv.Write(Columns); err != nil {
			return nil, err
		}
	}
	if pqW != nil {
		t.pq = parquet.NewGenericWriter[Row](pqW, parquet.Compression(&parquet.Zstd), parquet.MaxRowsPerRowGroup(RowGroupRows))
	}
	return t, nil
}

// Write writes one record's rows.
func (t *TableWriter) Write(rows []Row) error {
	if t.pq != nil {
		if _, err := t.pq.Write(rows); err != nil {
			return err
		}
	}
	if t.csv != nil {
		for i := range rows {
			if err := t.csv.Write(t.csvRecord(&rows[i])); err != nil {
				return err
			}
		}
	}
	return nil
}

// Close flushes both tables.
func (t *TableWriter) Close() error {
	if t.pq != nil {
		if err := t.pq.Close(); err != nil {
			return err
		}
	}
	if t.csv != nil {
		t.csv.Flush()
		return t.csv.Error()
	}
	return nil
}

// csvRecord formats a row: numbers in the shortest form that reads back
// exactly, nulls as empty fields.
func (t *TableWriter) csvRecord(r *Row) []string {
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	o := func(v *float64) string {
		if v == nil {
			return ""
		}
		return f(*v)
	}
	t.rec = append(t.rec[:0], r.RequestID, r.Tags, r.CandidateID, f(r.Priority), f(r.UserDistM), o(r.RouteDistM),
		o(r.AlongM), o(r.EtaS), o(r.ViewDistM), f(r.FootprintAreaM2), f(r.VisibleRadiusM), f(r.AspectRatio),
		f(r.SpeedMps), r.RefBucket, r.PhoneBucket, o(r.RefFirstShownS), o(r.PhoneFirstShownS), f(r.RefShownS),
		f(r.PhoneShownS), r.Verdict, r.Cause, o(r.PEarly), o(r.PMid), o(r.PLate), o(r.PNever))
	return t.rec
}
