package report

import (
	"fmt"

	"renderchain/dsp/wavio"
)

// InputNotes are the one-line notes on a WAV input that a reader let pass
// but a listener should know: overs float samples beyond full scale, up to
// the reader's bound (wavio.DefaultFloatLimitDB), and each header fault the
// reader tolerated (wavio.Reader.Warnings). Each note names the file.
func InputNotes(path string, overs int64, readerWarnings []string) []string {
	var notes []string
	if overs > 0 {
		notes = append(notes, fmt.Sprintf("%s: %d float samples are beyond full scale (up to %+.0f dBFS accepted): a circuit sees them louder than a full-scale signal", path, overs, wavio.DefaultFloatLimitDB))
	}
	for _, w := range readerWarnings {
		notes = append(notes, path+": "+w)
	}
	return notes
}
