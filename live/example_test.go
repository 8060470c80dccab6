package live_test

import (
	"fmt"
	"time"

	"github.com/viewspec/viewspec/live"
)

// An implementation under test is a shell command speaking the wire; this
// one knows only hello.
func ExampleProcess_Hello() {
	p, err := live.Start(`read -r line; echo '{"id":"viewspec-hello","spec":"viewspec/1","ops":["hello"]}'; cat >/dev/null`, 5*time.Second)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer p.Close()
	h, err := p.Hello()
	fmt.Println(h.Spec, h.Ops, err)
	// Output:
	// viewspec/1 [hello] <nil>
}
