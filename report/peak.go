package report

import "math"

// PeakRMS accumulates the largest magnitude, the mean and the mean square
// of a stream of samples in constant memory, and counts the samples whose
// magnitude reaches Threshold (when it is above 0). The zero value counts
// nothing over; Add does not allocate.
type PeakRMS struct {
	// Threshold is the magnitude from which a sample counts as over
	// (1 for digital full scale); 0 counts none.
	Threshold float64

	peak, sum, sumSq float64
	n, over          int64
}

// Add takes samples (of any channel layout: all are pooled).
func (m *PeakRMS) Add(x []float64) {
	for _, v := range x {
		a := math.Abs(v)
		if a > m.peak {
			m.peak = a
		}
		if m.Threshold > 0 && a >= m.Threshold {
			m.over++
		}
		m.sum += v
		m.sumSq += v * v
	}
	m.n += int64(len(x))
}

// N is the number of samples taken.
func (m *PeakRMS) N() int64 { return m.n }

// Peak is the largest magnitude taken (0 for none).
func (m *PeakRMS) Peak() float64 { return m.peak }

// Over is the number of samples whose magnitude reached Threshold.
func (m *PeakRMS) Over() int64 { return m.over }

// Mean is the mean of the samples (the DC offset), 0 for none.
func (m *PeakRMS) Mean() float64 {
	if m.n == 0 {
		return 0
	}
	return m.sum / float64(m.n)
}

// RMS is the root of the mean square, 0 for none.
func (m *PeakRMS) RMS() float64 {
	if m.n == 0 {
		return 0
	}
	return math.Sqrt(m.sumSq / float64(m.n))
}

// CrestDB is 20·log10(peak/RMS): 3.01 dB for a sine, 0 dB for a square
// wave, NaN for silence (no level to compare with).
func (m *PeakRMS) CrestDB() float64 {
	if m.RMS() == 0 {
		return math.NaN()
	}
	return DB(m.peak / m.RMS())
}
