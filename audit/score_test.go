package audit_test

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/internal/testtool"
)

// sklearnScores computes per-bucket Brier score, log loss and the
// reliability bins with scikit-learn (brier_score_loss, log_loss,
// calibration_curve with 10 uniform bins) on the same predictions.
const sklearnScores = `
import json, sys
import numpy as np
from sklearn.metrics import brier_score_loss, log_loss
from sklearn.calibration import calibration_curve
d = json.load(open(sys.argv[1]))
p = np.array(d["p"])
out = {}
for who in ("phone", "reference"):
    ys = np.array(d[who])
    res = []
    for b in range(4):
        y = (ys == b).astype(float)
        q = p[:, b]
        frac, mean = calibration_curve(y, q, n_bins=10, strategy="uniform")
        res.append({"brier": brier_score_loss(y, q), "log_loss": log_loss(y, q, labels=[0, 1]),
                    "frac_true": frac.tolist(), "mean_p": mean.tolist()})
    out[who] = res
print(json.dumps(out))
`

// The scores of the demo fleet's predictions against scikit-learn's
// (Debian's python3-sklearn): the same numbers within 1e-12 relative.
func TestScoresMatchScikitLearn(t *testing.T) {
	py := testtool.NeedPythonModule(t, "sklearn", "python3-sklearn")
	s := demo.Default()
	p := writeFleet(t, s, 0, 24)
	index := map[string]int{"early": 0, "mid": 1, "late": 2, "never": 3}
	var data struct {
		P         [][4]float64 `json:"p"`
		Phone     []int        `json:"phone"`
		Reference []int        `json:"reference"`
	}
	tot, err := audit.Run([]string{p}, audit.Options{Sets: demoSets(s), OnResult: func(r *audit.Result) error {
		for _, o := range r.Outcomes {
			if o.Predicted != nil {
				data.P = append(data.P, *o.Predicted)
				data.Phone = append(data.Phone, index[o.PhoneBucket.String()])
				data.Reference = append(data.Reference, index[o.Ref.Bucket.String()])
			}
		}
		return nil
	}})
	if err != nil {
		t.Fatal(err)
	}
	in := filepath.Join(t.TempDir(), "scores.json")
	b, _ := json.Marshal(data)
	os.WriteFile(in, b, 0o644)
	script := filepath.Join(t.TempDir(), "scores.py")
	os.WriteFile(script, []byte(sklearnScores), 0o644)
	outB, err := exec.Command(py, script, in).Output()
	if err != nil {
		t.Fatalf("scikit-learn: %v", err)
	}
	var want map[string][4]struct {
		Brier    float64   `json:"brier"`
		LogLoss  float64   `json:"log_loss"`
		FracTrue []float64 `json:"frac_true"`
		MeanP    []float64 `json:"mean_p"`
	}
	if err := json.Unmarshal(outB, &want); err != nil {
		t.Fatal(err)
	}
	st := tot.All.Stats()
	if st.Scores == nil || st.Scores.Predictions != int64(len(data.P)) || len(data.P) < 500 {
		t.Fatalf("scores %+v for %d predictions", st.Scores, len(data.P))
	}
	near := func(what string, got, want float64) {
		if math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("%s = %.17g, scikit-learn %.17g", what, got, want)
		}
	}
	for who, got := range map[string][4]audit.BucketScoreOut{"phone": st.Scores.Phone, "reference": st.Scores.Ref} {
		for b := range 4 {
			w, g := want[who][b], got[b]
			near(who+" "+g.Bucket+" brier", g.Brier, w.Brier)
			near(who+" "+g.Bucket+" log loss", g.LogLoss, w.LogLoss)
			if len(g.Bins) != len(w.FracTrue) {
				t.Errorf("%s %s: %d bins, scikit-learn %d", who, g.Bucket, len(g.Bins), len(w.FracTrue))
				continue
			}
			for i, bin := range g.Bins {
				near(who+" "+g.Bucket+" bin frac_true", bin.FracTrue, w.FracTrue[i])
				near(who+" "+g.Bucket+" bin mean_p", bin.MeanP, w.MeanP[i])
			}
		}
	}
}
