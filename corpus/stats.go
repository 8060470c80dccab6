package corpus

// Stats counts a corpus's cases per op and per op/family.
type Stats struct {
	Cases    int            `json:"cases"`
	ByOp     map[string]int `json:"by_op"`
	ByFamily map[string]int `json:"by_family"`
}

// StatsOf counts cases.
func StatsOf(cases []Case) Stats {
	s := Stats{Cases: len(cases), ByOp: map[string]int{}, ByFamily: map[string]int{}}
	for _, c := range cases {
		s.ByOp[c.Op]++
		s.ByFamily[c.Op+"/"+c.Family]++
	}
	return s
}
