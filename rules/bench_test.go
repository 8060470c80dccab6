package rules

import "testing"

func BenchmarkStep(b *testing.B) {
	s := mustParseFile(b, "phone.yaml")
	st, err := s.Start(10, 0, false)
	if err != nil {
		b.Fatal(err)
	}
	// A speed that sweeps 0 to 40 m/s and back, crossing every band edge, with a turn every so often.
	speeds := make([]float64, 256)
	for i := range speeds {
		v := float64(i % 128)
		if i >= 128 {
			v = 127 - v
		}
		speeds[i] = v * 40 / 127
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := st.Step(0.25, speeds[i&255], float64(i&511), i&64 == 0); err != nil {
			b.Fatal(err)
		}
	}
	if z := st.Zoom(); z < s.MinZoom || z > s.MaxZoom {
		b.Fatalf("zoom %v out of range", z)
	}
}

func TestStepAllocatesNothing(t *testing.T) {
	s := worked()
	st, err := s.Start(10, 0, false)
	if err != nil {
		t.Fatal(err)
	}
	v := 0.0
	if n := testing.AllocsPerRun(1000, func() {
		v += 0.37
		if v > 40 {
			v = 0
		}
		_ = st.Step(0.25, v, 100, true)
	}); n != 0 {
		t.Errorf("Step allocates %v times a call, want 0", n)
	}
}

func BenchmarkParse(b *testing.B) {
	data := mustReadRuleFile(b, "phone.yaml")
	b.ReportAllocs()
	b.SetBytes(int64(len(data)))
	for i := 0; i < b.N; i++ {
		if _, err := Parse(data, "phone.yaml"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkLint(b *testing.B) {
	data := mustReadRuleFile(b, "incar.yaml")
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if fs := Lint(data, "incar.yaml"); len(fs) != 0 {
			b.Fatal(fs)
		}
	}
}

func BenchmarkEvaluate(b *testing.B) {
	s := mustParseFile(b, "incar.yaml")
	samples := make([]Sample, 480) // two minutes at 0.25 s
	for i := range samples {
		samples[i] = Sample{TS: float64(i) * 0.25, SpeedMps: float64(i%160) / 4}
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, _, err := s.Evaluate(samples); err != nil {
			b.Fatal(err)
		}
	}
}
