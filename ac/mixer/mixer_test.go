package mixer

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"qpoint/ac"
)

// demoSettings returns the demo mixer's own analysis.
func demoSettings(t *testing.T) (Settings, func() *Result) {
	nw := network(t, demoFile(t, "mixer"))
	c := nw.Point.Circuit.Analysis.Mixer
	s := Settings{LO: portIndex(t, nw, c.LO), RF: portIndex(t, nw, c.RF), IF: portIndex(t, nw, c.IF),
		LOFrequencyHz: c.LOFrequencyHz, RFFrequencyHz: c.RFFrequencyHz, LOEMF: ac.DBmToEMF(c.LOLevel.DBm, 50)}
	return s, func() *Result {
		res, err := Analyze(nw, s)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
}

// TestPumpAgainstShooting: the LO-driven steady state by harmonic balance
// equals the one shooting finds (Aprille and Trick 1972), junction
// currents at DC and the first five harmonics within 1e-6 of each
// junction's largest, on the demo mixer.
func TestPumpAgainstShooting(t *testing.T) {
	nw := network(t, demoFile(t, "mixer"))
	s, _ := demoSettings(t)
	s.CheckShooting = true
	res, err := Analyze(nw, s)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("shooting against harmonic balance: %.2g", res.Stats.Shooting)
	if !(res.Stats.Shooting < 1e-6) {
		t.Errorf("shooting and harmonic balance differ by %.3g of the junction currents (%s)", res.Stats.Shooting, res.Stats.ShootingError)
	}
}

// TestTransposedTransfers: the IF voltage the transposed solve gives for
// the RF excitation, Σ r_kᵀ b_k, equals the one the direct solve gives,
// to rounding: the noise uses the one, the conversion loss the other.
func TestTransposedTransfers(t *testing.T) {
	nw := network(t, demoFile(t, "mixer"))
	s, run := demoSettings(t)
	res := run()
	waves, _ := junctionWaves(nw, pumpHarmonics(res.Pump), 2*maxSidebands)
	for _, K := range []int{4, 16} {
		cv, err := newConversion(nw, s, waves, K)
		if err != nil {
			t.Fatal(err)
		}
		r := cv.ifTransfers()
		port := nw.Ports[s.RF]
		for _, k := range []int{1, -1, 2} {
			sol := cv.excite(s.RF, k, 1)
			direct := portVoltage(nw, s.IF, sol.x[K])
			adjoint := at(r[K+k], port.Node) - at(r[K+k], port.Return)
			if cmplx.Abs(direct-adjoint) > 1e-10*cmplx.Abs(direct) {
				t.Errorf("K = %d, sideband %+d: IF voltage %v directly, %v by the transposed solve", K, k, direct, adjoint)
			}
		}
	}
}

// TestDemoFigures: the demo's figures are those of a working mixer:
// a loss between 3.9 dB (the ideal commutating mixer) and 10 dB, a noise
// figure (DSB) within a few dB of the loss, the LO absorbed below its
// available power, and the LO's fundamental balanced out of the RF port
// by 30 dB or more.
func TestDemoFigures(t *testing.T) {
	_, run := demoSettings(t)
	r := run()
	t.Logf("loss %.3f dB (image %.3f, up %.3f), NF %.3f dB SSB, %.3f dB DSB; Z_RF %.4g, Z_IF %.4g, Z_LO %.4g; LO %.2f dBm absorbed of %.2f; isolation LO-RF %.1f dB, LO-IF %.1f dB; %d sidebands, %d harmonics",
		r.ConversionLossDB, r.ImageConversionLossDB, r.UpconversionLossDB, r.Noise.FigureSSBDB, r.Noise.FigureDSBDB,
		r.RFInputImpedance, r.IFOutputImpedance, r.LO.InputImpedance, dbm(r.LO.AbsorbedW), dbm(r.LO.AvailableW),
		dbm(r.LO.AvailableW)-dbm(r.LO.LeakageToRFW), dbm(r.LO.AvailableW)-dbm(r.LO.LeakageToIFW), r.Stats.Sidebands, r.Stats.Pump.Harmonics)
	switch {
	case !(r.ConversionLossDB > 3.9 && r.ConversionLossDB < 10):
		t.Errorf("conversion loss %.3f dB", r.ConversionLossDB)
	case !(math.Abs(r.Noise.FigureDSBDB-r.ConversionLossDB) < 4):
		t.Errorf("DSB noise figure %.3f dB against a loss of %.3f dB", r.Noise.FigureDSBDB, r.ConversionLossDB)
	case !(r.LO.AbsorbedW > 0 && r.LO.AbsorbedW < r.LO.AvailableW):
		t.Errorf("LO absorbed %g W of %g W available", r.LO.AbsorbedW, r.LO.AvailableW)
	case !(dbm(r.LO.AvailableW)-dbm(r.LO.LeakageToRFW) > 30):
		t.Errorf("LO-RF isolation %.1f dB", dbm(r.LO.AvailableW)-dbm(r.LO.LeakageToRFW))
	}
	var share float64
	for _, c := range r.Noise.Contributions {
		share += c.Share
	}
	if math.Abs(share-1) > 1e-9 {
		t.Errorf("noise shares add to %.12f", share)
	}
}

func dbm(w float64) float64 { return 10 * math.Log10(w*1e3) }

// TestBadRequests: what Analyze refuses, and with which setting named.
func TestBadRequests(t *testing.T) {
	nw := network(t, demoFile(t, "mixer"))
	base, _ := demoSettings(t)
	for _, c := range []struct {
		name, setting, phrase string
		edit                  func(*Settings)
	}{
		{"IF zero", "rf-frequency", "the IF would be 0 Hz", func(s *Settings) { s.RFFrequencyHz = s.LOFrequencyHz }},
		{"LO and RF on one port", "rf", "both on port", func(s *Settings) { s.RF = s.LO }},
		{"IF on the RF port", "if", "the IF and the RF are both on port", func(s *Settings) { s.IF = s.RF }},
		{"IF on the LO's harmonic", "rf-frequency", "falls on the LO's harmonic 1", func(s *Settings) { s.RFFrequencyHz = 2 * s.LOFrequencyHz }},
		{"IF on half the LO", "rf-frequency", "falls on 0.5 times the LO frequency", func(s *Settings) { s.RFFrequencyHz = 1.5 * s.LOFrequencyHz }},
		{"IF on three halves", "rf-frequency", "falls on 1.5 times", func(s *Settings) { s.RFFrequencyHz = 2.5 * s.LOFrequencyHz }},
		{"port out of range", "if", "the circuit has 3 ports", func(s *Settings) { s.IF = 7 }},
		{"frequency out of range", "lo-frequency", "outside the supported range", func(s *Settings) { s.LOFrequencyHz = 2e12 }},
	} {
		s := base
		c.edit(&s)
		_, err := Analyze(nw, s)
		var se *SettingError
		if !errors.As(err, &se) || se.Setting != c.setting || !strings.Contains(err.Error(), c.phrase) {
			t.Errorf("%s: %v; want a SettingError on %s saying %q", c.name, err, c.setting, c.phrase)
		}
	}
	// A drive that takes a junction past its knee.
	s := base
	s.LOEMF = ac.DBmToEMF(19, 50)
	res, err := Analyze(nw, s)
	var be *BreakdownError
	if !errors.As(err, &be) || res == nil || be.KneeVoltage != 5 {
		t.Fatalf("LO at +19 dBm: %v; want a BreakdownError with the pump", err)
	}
	t.Log(err)
	s.AllowBreakdown = true
	if _, err := Analyze(nw, s); err != nil {
		t.Errorf("with AllowBreakdown: %v", err)
	}
}
