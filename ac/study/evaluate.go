package study

import (
	"qpoint/bias"
	"qpoint/bias/circuit"
)

// Workspace is the storage that one goroutine's evaluations of whole
// circuits reuse (Evaluate): the bias system and point, the linearised
// network and the factorisations of the sweep and the distortion
// estimate. The zero value is ready to use; a Workspace is not safe for
// concurrent use.
type Workspace struct {
	ws workspace
}

// Evaluate analyses circuit c as one study step at its own temperature
// (c.TemperatureK): the bias point solved from start (nil for a cold
// start), each diode's Q point, the response at s.FrequenciesHz, and the
// distortion, noise figure and detector figures that s asks for. s's axes
// are not used: the caller has set every value in c. It fills st, whose
// Measure readings then work as on a study's step, and returns the bias
// point, which lives in the workspace until its next Evaluate (pass it as
// the next start to continue from it). An evaluation's results depend on
// c, s and start alone, never on what the workspace or st held; st's
// slices are reused, so what an earlier Evaluate left in st is
// overwritten (copy what must be kept).
func (w *Workspace) Evaluate(c *circuit.Circuit, s *Settings, start *bias.Point, st *Step) *bias.Point {
	// Keep the storage of the slices the step fills, not their contents.
	*st = Step{Diodes: st.Diodes[:0], Responses: st.Responses[:0], Distortion: st.Distortion[:0],
		NoiseFigureDB: st.NoiseFigureDB[:0], sensitivities: st.sensitivities}
	return analyse(c, c.TemperatureK, s.FrequenciesHz, *s, start, st, &w.ws)
}
