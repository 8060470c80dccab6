package corpus_test

import (
	"bytes"
	"fmt"

	"github.com/viewspec/viewspec/corpus"
)

// A corpus is generated from a seed: the same seed, count and GenVersion
// give the same bytes, and every op's every edge family has its cases.
func ExampleGenerate() {
	var a, b bytes.Buffer
	n, _ := corpus.Generate(&a, 7, 60, map[string]bool{"horizon": true})
	corpus.Generate(&b, 7, 60, map[string]bool{"horizon": true})
	same := bytes.Equal(a.Bytes(), b.Bytes())
	cases, _ := corpus.ReadCorpus("a.jsonl", &a)
	st := corpus.StatsOf(cases)
	fmt.Println(n, same, st.ByOp["horizon"], st.ByFamily["horizon/invalid_camera"] > 0)
	// Output:
	// 56 true 56 true
}
