package corpus

import (
	"bytes"
	"fmt"
	"strings"
	"sync"

	"github.com/santhosh-tekuri/jsonschema/v6"
	"golang.org/x/text/language"
	"golang.org/x/text/message"

	"github.com/viewspec/viewspec/fixtures"
)

// The ids of the published JSON Schemas (draft 2020-12) of corpus lines
// and answer lines, embedded in package fixtures.

const (
	caseSchemaID   = "https://viewspec.invalid/schema/case.schema.json"
	answerSchemaID = "https://viewspec.invalid/schema/answer.schema.json"
)

// Schema returns the published schema of corpus lines ("case") or answer
// lines ("answer").
func Schema(name string) ([]byte, error) {
	return fixtures.Schemas.ReadFile("schema/" + name + ".schema.json")
}

var compiledSchemas = sync.OnceValues(func() (map[string]*jsonschema.Schema, error) {
	c := jsonschema.NewCompiler()
	for id, file := range map[string]string{caseSchemaID: "case", answerSchemaID: "answer"} {
		data, err := Schema(file)
		if err != nil {
			return nil, err
		}
		doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(data))
		if err != nil {
			return nil, fmt.Errorf("schema %s: %w", file, err)
		}
		if err := c.AddResource(id, doc); err != nil {
			return nil, err
		}
	}
	out := map[string]*jsonschema.Schema{}
	for id, name := range map[string]string{caseSchemaID: "case", answerSchemaID: "answer"} {
		s, err := c.Compile(id)
		if err != nil {
			return nil, fmt.Errorf("schema %s does not compile: %w", name, err)
		}
		out[name] = s
	}
	return out, nil
})

// ValidateLine checks one line against the named schema ("case" or
// "answer") and returns what is wrong, or nil.
func ValidateLine(schema string, line []byte) error {
	ss, err := compiledSchemas()
	if err != nil {
		return err
	}
	doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(line))
	if err != nil {
		return fmt.Errorf("not JSON: %v", err)
	}
	if err := ss[schema].Validate(doc); err != nil {
		if ve, ok := err.(*jsonschema.ValidationError); ok {
			return fmt.Errorf("%s", firstCause(ve))
		}
		return err
	}
	return nil
}

// firstCause returns the deepest first cause of a validation error, where
// the message names the field, in words ("at /expect: missing property
// 'error'"), never a Go value.
func firstCause(ve *jsonschema.ValidationError) string {
	for len(ve.Causes) > 0 {
		ve = ve.Causes[0]
	}
	loc := "/" + strings.Join(ve.InstanceLocation, "/")
	return fmt.Sprintf("at %s: %s", loc, ve.ErrorKind.LocalizedString(english))
}

// english prints the schema library's messages.
var english = message.NewPrinter(language.English)
