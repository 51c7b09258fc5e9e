package report

// Stability is the pole analysis of a circuit linearised at its idle
// point, as reports write it: every pole below the analysis's bound, the
// least damped first, one of each complex pair.
type Stability struct {
	Unstable bool `json:"unstable"`
	// SlowestTimeConstantS is the longest decay time of the stable poles,
	// s (0 for a circuit without any).
	SlowestTimeConstantS Number `json:"slowest_time_constant_s"`
	Poles                []Pole `json:"poles"`
}

// Pole is one natural frequency s of a circuit.
type Pole struct {
	Hz float64 `json:"hz"` // |Im s|/2π; 0 for a real pole
	// TimeConstantS is −1/Re s: the time a stable pole's transient takes
	// to fall by 1/e, negative for a growing pole (the time it takes to
	// grow by e).
	TimeConstantS Number `json:"time_constant_s"`
	Unstable      bool   `json:"unstable"`
}
