package fastwire

import (
	"encoding/json"
	"testing"
)

// TestIsNumberIsTheJSONGrammar: IsNumber agrees with the standard
// library's JSON validator (RFC 8259 §6) on numbers and near misses.
func TestIsNumberIsTheJSONGrammar(t *testing.T) {
	for _, s := range []string{
		"0", "-0", "1", "-1", "10", "0.5", "-0.5", "1e5", "1E5", "1e+5", "1e-5", "1.25e-300", "1e999",
		"", "-", "01", "-01", "1.", ".5", "+1", "1e", "1e+", "0x10", "1.2.3", "NaN", "Inf", "- 1", "1_000",
	} {
		want := json.Valid([]byte(s)) && s != "" && (s[0] == '-' || s[0] >= '0' && s[0] <= '9')
		if got := IsNumber(s); got != want {
			t.Errorf("IsNumber(%q) = %v, want %v (encoding/json's Valid)", s, got, want)
		}
	}
}

// TestPlain: a line with an escape or invalid UTF-8 is left to the general
// decoder.
func TestPlain(t *testing.T) {
	for _, tc := range []struct {
		line string
		want bool
	}{
		{`{"id":"a"}`, true}, {`{"id":"é"}`, true}, {`{"id":"\u0041"}`, false}, {`{"id":"\0"}`, false}, {"{\"id\":\"\xff\"}", false},
	} {
		if got := Plain([]byte(tc.line)); got != tc.want {
			t.Errorf("Plain(%q) = %v, want %v", tc.line, got, tc.want)
		}
	}
}
