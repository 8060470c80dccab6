package rules

import (
	"bytes"
	_ "embed"
	"fmt"
	"sync"

	"github.com/santhosh-tekuri/jsonschema/v6"
)

// SchemaID is the $id of the published JSON Schema (draft 2020-12) for rule sets.
const SchemaID = "https://viewspec.invalid/schema/rules.schema.json"

//go:embed rules.schema.json
var schemaJSON []byte

// Schema returns the published JSON Schema for rule files and the wire's rules object (a copy; the
// caller may keep or change it). It checks shape and per-field ranges; [Parse] adds what a schema cannot
// say (edge order, which band is last, min_zoom ≤ max_zoom, finiteness).
func Schema() []byte { return bytes.Clone(schemaJSON) }

// compiledSchema compiles the embedded schema once. The schema is part of this package and a test
// compiles it, so a failure here is a broken build, reported as such.
var compiledSchema = sync.OnceValues(func() (*jsonschema.Schema, error) {
	doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(schemaJSON))
	if err != nil {
		return nil, fmt.Errorf("rules: embedded schema is not JSON: %w", err)
	}
	c := jsonschema.NewCompiler()
	if err := c.AddResource(SchemaID, doc); err != nil {
		return nil, fmt.Errorf("rules: embedded schema: %w", err)
	}
	sch, err := c.Compile(SchemaID)
	if err != nil {
		return nil, fmt.Errorf("rules: embedded schema does not compile: %w", err)
	}
	return sch, nil
})
