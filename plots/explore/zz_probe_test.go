package explore

import (
	"context"
	"fmt"
	"testing"
)

func TestProbeMixerDrag(t *testing.T) {
	s := newSession(t, "mixer")
	vals := startValues(s)
	ctl := control(t, s, "Vbias.value")
	s.Move(context.Background(), Request{Values: vals})
	start := positionOf(ctl, ctl.Value)
	for i := 0; i < 12; i++ {
		vals[ctl.Name] = ctl.text(valueAt(ctl, start+5*i))
		v, _ := s.Move(context.Background(), Request{Values: vals})
		fmt.Println(vals[ctl.Name], s.limit, v.Timing.WaveformSolves)
	}
}
