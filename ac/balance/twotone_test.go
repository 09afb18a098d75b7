package balance

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"
	"time"

	"qpoint/ac"
)

// TestIM3MatchesVolterra: with two tones of equal level on the demos
// where third-order products reach the output, the waveform's IM3
// (2 f1 - f2 relative to f1) equals the Volterra estimate within 0.05 dB
// while every junction runs at x = |v|/(n V_T) < 0.05, and IM3 relative to
// the fundamental rises 2 dB per dB of input (IM3 3 dB/dB, the
// fundamental 1 dB/dB: common practice), within 0.05 dB over 10 dB.
func TestIM3MatchesVolterra(t *testing.T) {
	for _, c := range []struct {
		name     string
		levelDBm float64
		spacing  float64 // f2 - f1
	}{
		{"detector", -50, 10e6},
		{"attenuator", -40, 1e6},
	} {
		nw := network(t, demo(t, c.name))
		dist := nw.Point.Circuit.Analysis.Distortion
		d := fileDrive(t, nw.Point.Circuit)
		d.SecondToneHz = dist.FrequencyHz + c.spacing
		d.EMF = ac.DBmToEMF(c.levelDBm, nw.Ports[d.Input].Impedance)
		var im3 []float64
		for _, step := range []float64{0, 10} {
			d.EMF = ac.DBmToEMF(c.levelDBm-step, nw.Ports[d.Input].Impedance)
			est, err := ac.Volterra(nw, d)
			if err != nil {
				t.Fatal(err)
			}
			x := 0.0
			for k, v := range est.Junctions {
				x = math.Max(x, cmplx.Abs(v)/nw.Diodes[k].Device.NVT())
			}
			if x >= 0.05 {
				t.Fatalf("%s: the check needs x < 0.05; got %.3f", c.name, x)
			}
			r, err := Solve(nw, d, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			diff := r.IM3dBc() - est.IM3dBc()
			t.Logf("%s at %.0f dBm (x = %.3f): IM3 %.3f dBc waveform, %.3f dBc estimate (%+.4f dB); IM2 %.3f / %.3f dBc; order %d, %d products, %v",
				c.name, c.levelDBm-step, x, r.IM3dBc(), est.IM3dBc(), diff, r.IM2dBc(), est.IM2dBc(), r.Stats.Harmonics, r.Stats.Products, r.Stats.Runtime)
			if math.Abs(diff) > 0.05 {
				t.Errorf("%s at %.0f dBm: waveform IM3 %.3f dBc, Volterra %.3f dBc", c.name, c.levelDBm-step, r.IM3dBc(), est.IM3dBc())
			}
			im3 = append(im3, r.IM3dBc())
		}
		if slope := (im3[0] - im3[1]) / 10; math.Abs(slope-2) > 0.005 {
			t.Errorf("%s: IM3 relative to the fundamental rises %.4f dB/dB, want 2 (3 dB/dB absolute)", c.name, slope)
		}
	}
}

// TestMappingOneToOne: the artificial frequency mapping gives every kept
// product its own index, for both truncations, every order up to 30 and
// tone ratios near and far from one; the diamond holds 2K² + 2K + 1
// products (half of them and DC kept), the box (2K + 1)².
func TestMappingOneToOne(t *testing.T) {
	for _, tr := range []Truncation{Diamond, Box} {
		for k := 1; k <= 30; k++ {
			for _, f2 := range []float64{1.0137e9, 1.001e9, 0.73e9, 2.71828e9} {
				s, err := twoTones(k, tr, 1e9, f2, 2)
				if err != nil {
					t.Fatalf("%s order %d: %v", tr, k, err)
				}
				seen := map[int]bool{}
				for _, p := range s.products {
					if seen[p.a] {
						t.Fatalf("%s order %d: index %d twice", tr, k, p.a)
					}
					seen[p.a] = true
				}
				want := k*k + k + 1 // diamond: half of 2K²+2K+1 products, and DC
				if tr == Box {
					want = (2*k+1)*(2*k+1)/2 + 1
				}
				if len(s.products) != want {
					t.Errorf("%s order %d: %d products, want %d", tr, k, len(s.products), want)
				}
			}
		}
	}
}

// TestBadRequests: requests harmonic balance cannot honour fail at once
// with a message that says what to change, never a hang.
func TestBadRequests(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	base := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9, EMF: 0.01}
	for _, c := range []struct {
		name  string
		drive func(ac.Drive) ac.Drive
		s     Settings
		want  string
	}{
		{"tones colliding", func(d ac.Drive) ac.Drive { d.SecondToneHz = 2e9; return d }, Settings{},
			"on the same frequency"},
		{"tones in ratio 3:2", func(d ac.Drive) ac.Drive { d.SecondToneHz = 1.5e9; return d }, Settings{},
			"not in a ratio of small whole numbers"},
		{"equal tones", func(d ac.Drive) ac.Drive { d.SecondToneHz = 1e9; return d }, Settings{},
			"must differ"},
		{"order too small", func(d ac.Drive) ac.Drive { d.SecondToneHz = 1.01e9; return d }, Settings{Order: 2},
			"at least 3"},
		{"report above order", func(d ac.Drive) ac.Drive { d.SecondToneHz = 1.01e9; return d }, Settings{Order: 4, Report: 5},
			"at least 5"},
		{"report above fixed harmonics", func(d ac.Drive) ac.Drive { return d }, Settings{Harmonics: 4, FixedHarmonics: true, Report: 5},
			"at least 5"},
		{"no such port", func(d ac.Drive) ac.Drive { d.Input = 7; return d }, Settings{}, "ports"},
		{"out of time", func(d ac.Drive) ac.Drive { d.EMF = 5; return d }, Settings{Timeout: time.Nanosecond},
			"did not converge within"},
	} {
		_, err := Solve(nw, c.drive(base), c.s)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want a message with %q", c.name, err, c.want)
		}
	}
	huge := network(t, ladder(300))
	if _, err := Solve(huge, ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9, SecondToneHz: 1.0137e9, EMF: 0.01},
		Settings{Order: 60, Truncation: Box}); err == nil || !strings.Contains(err.Error(), "at most") {
		t.Errorf("a box of order 60 on 300 unknowns: got %v, want a refusal", err)
	}
	var col *CollisionError
	if _, err := Solve(nw, ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9, SecondToneHz: 3e9, EMF: 0.01}, Settings{}); !errors.As(err, &col) {
		t.Errorf("f2 = 3 f1: got %v, want a CollisionError", err)
	}
}
