package plan

import (
	"errors"
	"math/cmplx"

	"qpoint/ac"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// NoiseRequest asks for a noise analysis. Zero fields take the file's
// analysis blocks, else the policy's defaults.
type NoiseRequest struct {
	Input, Output string
	Grid          Grid
	// BandHz is the band the noise is integrated over; zero: the sweep.
	BandHz [2]float64
	// CarrierHz is the carrier a detector detects; zero: the file's
	// distortion frequency. VideoBandHz is the detector's video band;
	// zero: DefaultVideoFromHz to DefaultVideoToHz. Giving either asks
	// for the detector figures: the output must then be a detector's.
	CarrierHz   float64
	VideoBandHz [2]float64
}

// Noise is a resolved noise analysis.
type Noise struct {
	Settings              ac.NoiseSettings
	InputName, OutputName string // InputName is "" without an input port
	Grid                  []float64
	BandHz                [2]float64
	HasBand               bool
	CarrierHz             float64
	VideoBandHz           [2]float64
	// Detector: the output is a detector's for the carrier (asked for, or
	// ac.Detects found it so), and the detector figures apply.
	Detector bool
}

// ResolveNoise resolves a noise analysis of the network nw linearised
// from c. A one-port circuit observed at its own port has no input (its
// output noise alone). Where the output is a detector's, the default
// sweep is its video band.
func ResolveNoise(c *circuit.Circuit, nw *smallsignal.Network, r NoiseRequest) (*Noise, error) {
	p, err := SignalPath(c, r.Input, r.Output)
	if err != nil {
		return nil, err
	}
	in, inName := p.Input, p.InputName
	if p.Output.Port >= 0 && p.Output.Port == in {
		if r.Input != "" {
			return nil, requestErr("input,output", "both name port `%s`; the output must be another port or a node", inName)
		}
		in, inName = -1, "" // a one-port circuit: output noise only
	}
	n := &Noise{Settings: ac.NoiseSettings{Input: in, Output: p.Output}, InputName: inName, OutputName: p.OutputName,
		VideoBandHz: [2]float64{DefaultVideoFromHz, DefaultVideoToHz}}
	def := c.Analysis.Distortion
	switch {
	case r.CarrierHz != 0:
		if err := ac.CheckFrequency(r.CarrierHz); err != nil {
			return nil, requestErr("carrier", "%w", err)
		}
		n.CarrierHz = r.CarrierHz
	case def.Set:
		n.CarrierHz = def.FrequencyHz
	}
	if r.VideoBandHz != [2]float64{} {
		n.VideoBandHz = r.VideoBandHz
	}
	if r.BandHz != [2]float64{} {
		n.BandHz, n.HasBand = r.BandHz, true
	}
	asked := r.CarrierHz != 0 || r.VideoBandHz != [2]float64{}
	if asked && n.CarrierHz == 0 {
		return nil, requestErr("video-bandwidth", "detector figures need the carrier frequency; give the carrier (e.g. 2.45GHz) or analysis.distortion.frequency in the file")
	}
	if asked && in < 0 {
		return nil, requestErr("carrier,video-bandwidth", "detector figures need an input port for the carrier")
	}
	if n.CarrierHz > 0 && in >= 0 {
		_, err := ac.VoltageSensitivity(nw, n.Settings, n.CarrierHz)
		switch {
		case err == nil && asked:
			n.Detector = true
		case err == nil:
			// Unasked, a detector is an output that carries more
			// rectified DC than carrier at a small level.
			n.Detector = ac.Detects(nw, n.Settings, n.CarrierHz)
		case asked && errors.Is(err, ac.ErrNoRectification):
			return nil, requestErr("carrier,video-bandwidth", "output %s is not a detector output: %w", p.OutputName, err)
		case asked:
			return nil, err
		}
	}
	// The sweep: a detector's video band unless asked otherwise, else the
	// request, the file's analysis.response, the defaults.
	if n.Detector && r.Grid.FromHz == 0 && r.Grid.ToHz == 0 {
		if r.Grid.PerDecade != 0 && r.Grid.Points != 0 {
			return nil, requestErr("per-decade,points", "give one grid, not both")
		}
		if r.Grid.Points > 0 {
			n.Grid, err = ac.LinearGrid(n.VideoBandHz[0], n.VideoBandHz[1], r.Grid.Points)
		} else {
			perDecade := r.Grid.PerDecade
			if perDecade == 0 {
				perDecade = DefaultPerDecade
			}
			n.Grid, err = ac.LogGrid(n.VideoBandHz[0], n.VideoBandHz[1], perDecade)
		}
		if err != nil {
			return nil, requestErr("per-decade,points", "%w", err)
		}
	} else if n.Grid, err = ResponseGrid(c, r.Grid); err != nil {
		return nil, err
	}
	if k := len(n.Grid); !n.HasBand && k > 1 && n.Grid[k-1] > n.Grid[0] {
		n.BandHz, n.HasBand = [2]float64{n.Grid[0], n.Grid[k-1]}, true
	}
	return n, nil
}

// NoiseRun is everything a noise analysis computes for its plan.
type NoiseRun struct {
	Plan   *Noise
	Result *ac.NoiseResult // at each frequency of Plan.Grid
	Band   *ac.NoiseBand   // integrated over Plan.BandHz; nil without a band
	// Detection is the detector's sensitivity limit and Video its
	// sensitivity γ(f) at each frequency of the grid; nil unless
	// Plan.Detector.
	Detection *ac.Detection
	Video     []complex128
}

// Run computes the noise analysis n of the network nw.
func (n *Noise) Run(nw *smallsignal.Network) (*NoiseRun, error) {
	o := &NoiseRun{Plan: n}
	var err error
	if o.Result, err = ac.Noise(nw, n.Grid, n.Settings); err != nil {
		return nil, err
	}
	if n.HasBand {
		if o.Band, err = ac.IntegrateNoise(nw, n.Settings, n.BandHz[0], n.BandHz[1]); err != nil {
			return nil, err
		}
	}
	if n.Detector {
		if o.Detection, err = ac.Detector(nw, n.Settings, n.CarrierHz, n.VideoBandHz[0], n.VideoBandHz[1]); err != nil {
			return nil, err
		}
		if o.Video, err = ac.VideoSensitivity(nw, n.Settings, n.CarrierHz, n.Grid); err != nil {
			return nil, err
		}
	}
	return o, nil
}

// NEP returns the noise-equivalent power at grid point i, v_n(f)/|γ(f)|,
// of a detector.
func (o *NoiseRun) NEP(i int) float64 {
	return o.Result.Points[i].Density() / cmplx.Abs(o.Video[i])
}
