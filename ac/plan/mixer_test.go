package plan

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"qpoint/ac/mixer"
	"qpoint/ac/study"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// TestResolveMixer: the file's analysis.mixer fills what the request
// leaves out, a request's values win, and a value at fault is named as
// the setting (a flag) or at its key in the file.
func TestResolveMixer(t *testing.T) {
	c := demo(t, "mixer")
	m, err := ResolveMixer(c, MixerRequest{})
	if err != nil {
		t.Fatal(err)
	}
	s := m.Settings
	if m.LOName != "lo" || m.RFName != "rf" || m.IFName != "if" || s.LOFrequencyHz != 1.8e9 || s.RFFrequencyHz != 1.9e9 || m.LOLevelDBm != 7 {
		t.Errorf("resolved %+v; want the file's lo/rf/if at 1.8 and 1.9 GHz, 7 dBm", m)
	}
	// 7 dBm behind 50 Ω: E = sqrt(8 · 50 Ω · 5.012 mW) = 1.4159 V (common practice).
	if math.Abs(s.LOEMF-math.Sqrt(8*50*math.Pow(10, 0.7)*1e-3)) > 1e-12 || s.IFHz() != 1e8 {
		t.Errorf("EMF %g V, IF %g Hz", s.LOEMF, s.IFHz())
	}
	lv := circuit.Level{PeakVolts: 0.5}
	m, err = ResolveMixer(c, MixerRequest{RFFrequencyHz: 1.75e9, LOLevel: &lv, Sidebands: 8})
	if err != nil {
		t.Fatal(err)
	}
	// 0.5 V peak into a matched 50 Ω load: EMF 1 V, 10 log10(1/(8·50)/1e-3) = 3.98 dBm.
	if math.Abs(m.LOLevelDBm-3.9794000867) > 1e-9 || m.Settings.RFFrequencyHz != 1.75e9 || !m.Settings.FixedSidebands || m.Settings.Sidebands != 8 {
		t.Errorf("overridden: %+v", m)
	}
	for _, c2 := range []struct {
		name     string
		req      MixerRequest
		setting  string
		fromFile bool
		phrase   string
	}{
		{"IF zero by flag", MixerRequest{RFFrequencyHz: 1.8e9}, "rf-frequency", false, "the IF would be 0 Hz"},
		{"LO on the RF port", MixerRequest{LO: "rf"}, "lo", false, "both on port rf"},
		{"not a port", MixerRequest{IF: "video"}, "if", false, "`video` is not a port"},
		{"collision from the file", MixerRequest{LOFrequencyHz: 0.95e9}, "rf-frequency", true, "falls on the LO's harmonic 1"},
	} {
		_, err := ResolveMixer(c, c2.req)
		var re *RequestError
		if !errors.As(err, &re) || re.Settings[0] != c2.setting || re.FromFile() != c2.fromFile || !strings.Contains(err.Error(), c2.phrase) {
			t.Errorf("%s: %v; want a RequestError on %s (from the file: %v) saying %q", c2.name, err, c2.setting, c2.fromFile, c2.phrase)
		}
	}
	// The RF frequency came from the file: the message points at its key.
	_, err = ResolveMixer(c, MixerRequest{LOFrequencyHz: 0.95e9})
	if !strings.Contains(err.Error(), "mixer.yaml:") || !strings.Contains(err.Error(), "analysis.mixer.rf_frequency") {
		t.Errorf("%v: want the file's position and key", err)
	}
	if _, err := ResolveMixer(demo(t, "detector"), MixerRequest{}); err == nil || !strings.Contains(err.Error(), "a mixer needs three") {
		t.Errorf("detector: %v", err)
	}
	if lv, err := MixerLevels(-10, 10, 2.5); err != nil || len(lv) != 9 || lv[8] != 10 {
		t.Errorf("MixerLevels: %v %v", lv, err)
	}
}

// TestStudyConversionLoss: a study with the measure conversion_loss
// reads, at each step, the conversion loss the mixer analysis gives for
// that circuit on its own (the same bias set with WithOverride).
func TestStudyConversionLoss(t *testing.T) {
	c := demo(t, "mixer")
	st, err := ResolveStudy(c, StudyRequest{Axis: AxisRequest{Vary: "Vbias.value", From: "0.8V", To: "2V", Steps: 3},
		Goal: Minimize, MeasureText: "conversion_loss"})
	if err != nil {
		t.Fatal(err)
	}
	if st.Settings.Mixer == nil || !st.Measure.NeedsMixer() {
		t.Fatalf("the study does not analyse the mixer: %+v", st.Settings)
	}
	r, err := study.Run(c, st.Settings)
	if err != nil {
		t.Fatal(err)
	}
	for i, step := range r.Steps {
		got, err := st.Measure.Of(&step, r.Settings.FrequenciesHz, r.Probes)
		if err != nil {
			t.Fatal(err)
		}
		alone, err := c.WithOverride(fmt.Sprintf("Vbias.value=%gV", step.Values[0]))
		if err != nil {
			t.Fatal(err)
		}
		p, err := bias.Solve(alone, bias.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		nw, err := smallsignal.New(p)
		if err != nil {
			t.Fatal(err)
		}
		res, err := mixer.Analyze(nw, *st.Settings.Mixer)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-res.ConversionLossDB) > 1e-6 {
			t.Errorf("step %d (Vbias %g V): the study reads %.6f dB, the mixer alone %.6f dB", i, step.Values[0], got, res.ConversionLossDB)
		}
	}
}
