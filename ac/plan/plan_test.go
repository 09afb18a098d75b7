package plan

import (
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

func demo(t *testing.T, name string) *circuit.Circuit {
	t.Helper()
	c, err := circuit.Load(filepath.Join("..", "..", "testdata", "demo", name+".yaml"))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestDefaultsPolicy: with an empty request every resolver takes the
// file's analysis blocks (the detector demo has all three), and a
// request's own values win.
func TestDefaultsPolicy(t *testing.T) {
	c := demo(t, "detector")
	d, err := ResolveDrive(c, DriveRequest{})
	if err != nil {
		t.Fatal(err)
	}
	if d.InputName != "rf" || d.OutputName != "video" || d.FrequencyHz != 2.45e9 || d.LevelDBm != -30 {
		t.Errorf("drive %+v; want rf to video at 2.45 GHz, -30 dBm (the file's)", d)
	}
	// -30 dBm behind 50 Ω: E = sqrt(8 · 50 Ω · 1 µW) = 20 mV (common practice).
	if math.Abs(d.EMF-0.02) > 1e-15 {
		t.Errorf("EMF %g V, want 20 mV", d.EMF)
	}
	lv := circuit.Level{PeakVolts: 10e-3}
	d, err = ResolveDrive(c, DriveRequest{FrequencyHz: 915e6, Level: &lv})
	if err != nil {
		t.Fatal(err)
	}
	if d.FrequencyHz != 915e6 || math.Abs(d.LevelDBm+30) > 1e-12 {
		t.Errorf("10 mV peak into 50 Ω at 915 MHz: %g Hz, %g dBm; want -30 dBm", d.FrequencyHz, d.LevelDBm)
	}
	grid, err := ResponseGrid(c, Grid{})
	if err != nil {
		t.Fatal(err)
	}
	if grid[0] != 10e6 || grid[len(grid)-1] != 6e9 {
		t.Errorf("grid %g to %g Hz; want the file's 10 MHz to 6 GHz", grid[0], grid[len(grid)-1])
	}
	st, err := ResolveStudy(c, StudyRequest{})
	if err != nil {
		t.Fatal(err)
	}
	ax := st.Settings.Axis
	if ax.Vary.Text != "Vcc.value" || len(ax.Values) != 34 || ax.Values[0] != 0 || ax.Values[33] != 3.3 {
		t.Errorf("study %s over %d values %v..%v; want the file's Vcc.value 0 to 3.3 V in 34", ax.Vary.Text, len(ax.Values), ax.Values[0], ax.Values[len(ax.Values)-1])
	}
	if st.Settings.FrequenciesHz[0] != 2.45e9 || st.Settings.DistortionHz[0] != 2.45e9 || st.Settings.Drive.EMF != 0.02 {
		t.Errorf("study frequencies %v, distortion at %v, EMF %g", st.Settings.FrequenciesHz, st.Settings.DistortionHz, st.Settings.Drive.EMF)
	}
}

// TestStudyDefaultsAreNumbers: the file's study range reaches the study as
// the numbers the loader read, however many digits they carry: nothing is
// printed and read again.
func TestStudyDefaultsAreNumbers(t *testing.T) {
	c := demo(t, "detector")
	c.Analysis.Study.From, c.Analysis.Study.To = 0.1+0.2, 3.3000000000000003
	st, err := ResolveStudy(c, StudyRequest{})
	if err != nil {
		t.Fatal(err)
	}
	v := st.Settings.Axis.Values
	if v[0] != 0.1+0.2 || v[len(v)-1] != 3.3000000000000003 {
		t.Errorf("range %v..%v, want exactly %v..%v", v[0], v[len(v)-1], 0.1+0.2, 3.3000000000000003)
	}
}

// TestRequestErrors: a bad request names the setting; a bad value from
// the file names the file, line and key.
func TestRequestErrors(t *testing.T) {
	c := demo(t, "detector")
	cases := []struct {
		name    string
		err     func() error
		setting string
		file    bool
		phrase  string
	}{
		{"unknown input", func() error { _, err := ResolveDrive(c, DriveRequest{Input: "nosuch"}); return err }, "input", false, "not a port; accepted: rf, video"},
		{"level beyond range", func() error {
			lv := circuit.Level{PeakVolts: 1e6}
			_, err := ResolveDrive(c, DriveRequest{Level: &lv})
			return err
		}, "level", false, "is 130 dBm"},
		{"file level beyond range", func() error {
			cc := *c
			cc.Analysis.Distortion.Level = circuit.Level{PeakVolts: 1e6}
			_, err := ResolveDrive(&cc, DriveRequest{})
			return err
		}, "level", true, "analysis.distortion.level"},
		{"two grids", func() error { _, err := ResponseGrid(c, Grid{PerDecade: 3, Points: 9}); return err }, "per-decade", false, "give one grid"},
		{"study vary", func() error {
			_, err := ResolveStudy(c, StudyRequest{Axis: AxisRequest{Vary: "Rbais.value", From: "1k", To: "2k"}})
			return err
		}, "vary", false, "did you mean `Rbias`"},
		{"study range unit", func() error {
			_, err := ResolveStudy(c, StudyRequest{Axis: AxisRequest{Vary: "Rbias.value", From: "1V", To: "2k"}})
			return err
		}, "from", false, "not a valid resistance"},
		{"target grammar", func() error { _, _, err := ParseTarget("s21"); return err }, "target", false, "not MEASURE=VALUE"},
	}
	for _, k := range cases {
		err := k.err()
		var re *RequestError
		if !errors.As(err, &re) {
			t.Errorf("%s: %v, want a RequestError", k.name, err)
			continue
		}
		if re.Settings[0] != k.setting || re.FromFile() != k.file || !strings.Contains(err.Error(), k.phrase) {
			t.Errorf("%s: settings %v, from file %v, %q; want %s, %v, %q", k.name, re.Settings, re.FromFile(), err, k.setting, k.file, k.phrase)
		}
	}
}

// TestResolveNoiseDetector: the detector demo's video output detects its
// carrier, so the noise sweep defaults to the video band (1 Hz to 2 MHz),
// while the attenuator's does not and takes the file's response range.
func TestResolveNoiseDetector(t *testing.T) {
	for _, k := range []struct {
		name     string
		detector bool
		lo, hi   float64
	}{{"detector", true, 1, 2e6}, {"attenuator", false, 0, 0}} {
		c := demo(t, k.name)
		p, err := bias.Solve(c, bias.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		nw, err := smallsignal.New(p)
		if err != nil {
			t.Fatal(err)
		}
		n, err := ResolveNoise(c, nw, NoiseRequest{})
		if err != nil {
			t.Fatal(err)
		}
		if n.Detector != k.detector {
			t.Errorf("%s: detector %v, want %v", k.name, n.Detector, k.detector)
		}
		if k.detector && (n.Grid[0] != k.lo || n.Grid[len(n.Grid)-1] != k.hi) {
			t.Errorf("%s: grid %g to %g Hz, want the video band", k.name, n.Grid[0], n.Grid[len(n.Grid)-1])
		}
	}
}

func TestParseLevels(t *testing.T) {
	got, err := ParseLevels("sweep-level", "-10dBm:-8dBm:0.5dB", 50, 10)
	if err != nil || len(got) != 5 || got[0] != -10 || got[4] != -8 {
		t.Errorf("ParseLevels = %v, %v; want -10 to -8 dBm in 5 levels", got, err)
	}
	if _, err := ParseLevels("sweep-level", "-10dBm:10dBm:1dB", 50, 10); err == nil || !strings.Contains(err.Error(), "21 levels; accepted: at most 10") {
		t.Errorf("too many levels: %v", err)
	}
}

func TestParseTemperatureRange(t *testing.T) {
	lo, hi, err := ParseTemperatureRange("temperature-range", "-40C:85C")
	if err != nil || math.Abs(lo-233.15) > 1e-9 || math.Abs(hi-358.15) > 1e-9 {
		t.Errorf("ParseTemperatureRange = %v, %v, %v", lo, hi, err)
	}
	for _, s := range []string{"85C", "85C:-40C", "hot:cold"} {
		var re *RequestError
		if _, _, err := ParseTemperatureRange("temperature-range", s); !errors.As(err, &re) || re.Settings[0] != "temperature-range" {
			t.Errorf("%q: %v, want a RequestError of temperature-range", s, err)
		}
	}
}
