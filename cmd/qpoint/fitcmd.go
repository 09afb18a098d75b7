package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/bias/circuit"
	"qpoint/bias/extract"
	"qpoint/bias/measured"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/plots/results"
)

type fitFlags struct {
	iv, cv      []string
	temperature string
	measuredAt  string
	floor       string
	name        string
	asJSON      bool
	plotDir     string
}

func newFitCmd() *cobra.Command {
	var fl fitFlags
	cmd := &cobra.Command{
		Use:   "fit --iv FILE [--cv FILE]",
		Short: "Fit a diode model to measured I–V and C–V points",
		Long: `fit turns measurements into a diode model for the circuit file: the
forward current against voltage gives the saturation current, ideality and
series resistance; reverse points that reach breakdown give the knee;
capacitance against voltage gives the zero-bias capacitance, built-in
potential and grading coefficient; forward points at several temperatures
give the gap energy and the saturation-current temperature exponent.

Each value comes with its standard error and the correlations that matter
(saturation current and ideality are always correlated). A value the data
do not determine is left at its default, and a caution says so. The
result ends with a diode_models block ready to paste into a circuit file.

Files are CSV with a header naming the columns: voltage and current (I–V)
or voltage and capacitance (C–V), optionally temperature, each with its
unit in brackets or parentheses, e.g. "voltage [V], current (mA)" or
"capacitance [pF]". A column without a unit is read in SI base units. The
points of one temperature must be sorted by voltage. --iv may be given
several times, and FILE@TEMPERATURE gives the temperature of a file that
has no temperature column (else --temperature).

Exit status: 0 fitted, 1 the fit failed, 2 bad input or usage.`,
		Example: `  qpoint fit --iv testdata/fit/detector_iv.csv --cv testdata/fit/detector_cv.csv
  qpoint fit --iv cold.csv@-40C --iv room.csv@25C --iv hot.csv@85C
  qpoint fit --iv forward.csv --json > model.json
  qpoint fit --iv forward.csv --plots figures/ --name mixer_quad`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) > 0 {
				return inputError(fmt.Errorf("fit takes its files as --iv and --cv, not as arguments (got %q); e.g. qpoint fit --iv forward.csv", args[0]))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error { return runFit(guardOf(cmd), cmd.OutOrStdout(), &fl) },
	}
	f := cmd.Flags()
	f.StringArrayVar(&fl.iv, "iv", nil, "I–V points (CSV), FILE or FILE@TEMPERATURE; repeat for several files")
	f.StringArrayVar(&fl.cv, "cv", nil, "C–V points (CSV), FILE or FILE@TEMPERATURE")
	f.StringVar(&fl.temperature, "temperature", "27C", "temperature of files without a temperature column")
	f.StringVar(&fl.measuredAt, "measured-at", "", "temperature the fitted values hold at (default: the I–V temperature nearest 27C)")
	f.StringVar(&fl.floor, "current-floor", "", "the meter's absolute current resolution, e.g. 50pA: currents near it weigh less")
	f.StringVar(&fl.name, "name", "", "name of the model in the block (default: the first I–V file's name)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.plotDir, "plots", "", "write figures of data against fit and the residuals (SVG and PNG) into this directory")
	return cmd
}

func runFit(g *fileGuard, w io.Writer, fl *fitFlags) error {
	in, err := readFitInput(g, fl)
	if err != nil {
		return err
	}
	r, err := extract.Fit(in.Data, in.Settings)
	var de *extract.DataError
	switch {
	case errors.As(err, &de):
		return inputError(fmt.Errorf("%s%s", in.Place(de.Set, de.Index), de.Msg))
	case err != nil:
		return analysisError(err)
	}
	if fl.plotDir != "" {
		if err := g.writeFigures(fl.plotDir, plots.FitFigures(r)); err != nil {
			return err
		}
	}
	if fl.asJSON {
		return results.Write(w, results.FitOf(in, r))
	}
	report.WriteFit(w, in, r)
	return nil
}

func readFitInput(g *fileGuard, fl *fitFlags) (*report.FitInput, error) {
	if len(fl.iv) == 0 {
		return nil, inputError(fmt.Errorf("fit needs I–V points: --iv FILE (a CSV with voltage and current columns); e.g. qpoint fit --iv testdata/fit/detector_iv.csv"))
	}
	in := &report.FitInput{}
	tk, err := circuit.ParseBounded(fl.temperature, circuit.Temperature)
	if err != nil {
		return nil, inputError(fmt.Errorf("flag --temperature: %w", err))
	}
	in.Settings.TemperatureK = tk
	if err := quantityFlag("measured-at", fl.measuredAt, circuit.Temperature, &in.Settings.MeasuredAtK); err != nil {
		return nil, err
	}
	if fl.floor != "" {
		floor, err := circuit.ParseBounded(fl.floor, circuit.Current)
		if err != nil || !(floor >= 0) {
			if err == nil {
				err = fmt.Errorf("%s; accepted: a current of zero or more, e.g. 50pA", fl.floor)
			}
			return nil, inputError(fmt.Errorf("flag --current-floor: %w", err))
		}
		in.Settings.CurrentFloor = floor
	}
	for _, f := range []struct {
		flag  string
		specs []string
		kind  measured.Kind
	}{{"--iv", fl.iv, measured.CurrentVoltage}, {"--cv", fl.cv, measured.CapacitanceVoltage}} {
		for _, spec := range f.specs {
			path, t, err := g.readMeasurementFile(f.flag, spec, f.kind)
			if err != nil {
				return nil, err
			}
			in.Add(path, t)
		}
	}
	in.Name = fl.name
	if in.Name == "" {
		in.Name = report.ModelName(in.IV[0].Path)
	}
	if err := report.CheckModelName(in.Name); err != nil {
		return nil, inputError(fmt.Errorf("flag --name %q: %w", in.Name, err))
	}
	return in, nil
}

// readMeasurementFile reads FILE or FILE@TEMPERATURE and checks that it
// holds the kind of points its flag asks for.
func (g *fileGuard) readMeasurementFile(flag, spec string, kind measured.Kind) (string, *measured.Table, error) {
	path, tempK := spec, 0.0
	if _, err := os.Stat(spec); err != nil {
		if at := strings.LastIndexByte(spec, '@'); at > 0 {
			t, perr := circuit.ParseBounded(spec[at+1:], circuit.Temperature)
			if perr != nil {
				return "", nil, inputError(fmt.Errorf("flag %s %s: after @ %w", flag, spec, perr))
			}
			path, tempK = spec[:at], t
		}
	}
	g.read(path)
	fh, err := os.Open(path)
	if err != nil {
		return "", nil, inputError(fmt.Errorf("flag %s: cannot read the measurement file: %w", flag, err))
	}
	defer fh.Close()
	t, err := measured.Read(fh)
	var pe *measured.ParseError
	switch {
	case errors.As(err, &pe):
		return "", nil, inputError(fmt.Errorf("%s:%d:%d: %s", path, pe.Line, pe.Column, pe.Msg))
	case err != nil:
		return "", nil, inputError(fmt.Errorf("%s: %w", path, err))
	}
	if t.Kind != kind {
		other := map[measured.Kind]string{measured.CurrentVoltage: "--iv", measured.CapacitanceVoltage: "--cv"}[t.Kind]
		return "", nil, inputError(fmt.Errorf("%s:%d:1: an %s file given as %s; accepted: I–V files (voltage, current) with --iv and C–V files (voltage, capacitance) with --cv; give it as %s",
			path, t.HeaderLine, t.Kind, flag, other))
	}
	if tempK > 0 {
		if t.HasTemperature {
			return "", nil, inputError(fmt.Errorf("flag %s %s: the file has a temperature column, so @%s cannot apply; accepted: FILE@TEMPERATURE only for a file without one", flag, spec, spec[strings.LastIndexByte(spec, '@')+1:]))
		}
		for i := range t.Points {
			t.Points[i].TemperatureK = tempK
		}
	}
	return path, t, nil
}
