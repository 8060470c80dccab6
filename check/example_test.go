package check_test

import (
	"bytes"
	"encoding/json"
	"fmt"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/reference"
)

// Checking answers against a corpus: the reference's own answer passes
// under the strict profile; the same answer with its first pixel moved 3 px
// to the right fails, and the difference names the field.
func ExampleCompare() {
	var buf bytes.Buffer
	corpus.Generate(&buf, 1, 6, map[string]bool{"project": true})
	cases, _ := corpus.ReadCorpus("c.jsonl", &buf)
	c := cases[0]
	strict := check.Profiles["strict"]
	ans := reference.AnswerLine(c.Request, 1)
	st, _ := check.Compare(&c, ans, &strict)
	fmt.Println(c.ID, st)

	var a struct {
		ID     string           `json:"id"`
		Screen []map[string]any `json:"screen"`
	}
	json.Unmarshal(ans, &a)
	a.Screen[0]["x"] = a.Screen[0]["x"].(float64) + 3
	moved, _ := json.Marshal(a)
	st, diffs := check.Compare(&c, moved, &strict)
	fmt.Println(st, diffs[0].Path)
	// Output:
	// project/random/0000 pass
	// fail screen[0].xy
}
