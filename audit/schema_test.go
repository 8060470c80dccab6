package audit_test

import (
	"bytes"
	"strings"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/fixtures"
)

// The published drive-log schema (JSON Schema draft 2020-12) accepts the
// demo fleet's records and refuses the shapes the reader refuses.
func TestDriveLogSchema(t *testing.T) {
	data, err := fixtures.Schemas.ReadFile("schema/drive-log.schema.json")
	if err != nil {
		t.Fatal(err)
	}
	doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	c := jsonschema.NewCompiler()
	const id = "https://viewspec.invalid/schema/drive-log.schema.json"
	if err := c.AddResource(id, doc); err != nil {
		t.Fatal(err)
	}
	sch, err := c.Compile(id)
	if err != nil {
		t.Fatal(err)
	}
	check := func(line string) error {
		v, err := jsonschema.UnmarshalJSON(strings.NewReader(line))
		if err != nil {
			t.Fatal(err)
		}
		return sch.Validate(v)
	}
	s := demo.Default()
	for i := range 8 {
		line, _ := s.FleetRecord(i)
		if err := check(string(line)); err != nil {
			t.Errorf("fleet record %d: %v", i, err)
		}
	}
	for _, bad := range []string{
		`{"request_id":"r","device":{"width_px":1,"height_px":1,"fov_y_deg":45},"rules_ref":"p","trace":[{"t_s":0,"lat":0,"lon":0}],"candidates":[]}`,
		`{"request_id":"r","device":{"width_px":1,"height_px":1,"fov_y_deg":45},"trace":[{"t_s":0,"lat":0,"lon":0},{"t_s":1,"lat":0,"lon":1}],"candidates":[]}`,
		`{"request_id":"r","device":{"width_px":1,"height_px":1,"fov_y_deg":45},"rules_ref":"p","trace":[{"t_s":0,"lat":0,"lon":0},{"t_s":1,"lat":0,"lon":1}],"candidates":[],"predicted":[{"id":"a","p":[0.5,0.5]}]}`,
	} {
		if check(bad) == nil {
			t.Errorf("the schema accepts %s", bad)
		}
	}
}
