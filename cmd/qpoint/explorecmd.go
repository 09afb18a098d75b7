package main

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"os"

	"github.com/spf13/cobra"

	"qpoint/ac/plan"
	"qpoint/plots/explore"
)

// exploreOptions are the explore command's flags.
type exploreOptions struct {
	file, listen          string
	circuitOut, reportOut string
	open                  bool
	sets                  []string
}

func newExploreCmd() *cobra.Command {
	var o exploreOptions
	cmd := &cobra.Command{
		Use:   "explore FILE",
		Short: "Vary values in a browser and watch the Q point, match and distortion move",
		Long: `explore serves a page on this computer only (a loopback address) with a
slider and a typed box for every source and part value, each diode-model
key, the temperature and the drive's level and frequency. Every move
redraws the diode Q points, each diode's I–V curve with its load line,
the transmission and return loss over the file's band, the Smith chart
with the drive's frequency marked, the Volterra estimate of the harmonics
(and intermodulation, with a second tone) with the small-signal validity
limit, and a detector's sensitivity. The full nonlinear waveform check
runs when asked, with its progress shown.

Two buttons keep what you found: one writes the values as a circuit file
beside the original (FILE's name with .explored.yaml; never the original
itself), the other the HTML report at those values (.explored.html).
--circuit-out and --report-out name other files. The page fetches
nothing from the network; the server reads no file but FILE and writes
none but those two.

The command runs until interrupted (Ctrl-C).`,
		Example: `  qpoint explore testdata/demo/detector.yaml
  qpoint explore mixer.yaml --listen 127.0.0.1:8470 --open
  qpoint explore detector.yaml --set Rbias.value=100k --circuit-out detector-100k.yaml`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			o.file = args[0]
			return runExplore(context.Background(), guardOf(cmd), cmd.OutOrStdout(), cmd.ErrOrStderr(), o, nil)
		},
	}
	cmd.Flags().StringVar(&o.listen, "listen", "", "loopback address and port to serve on, e.g. 127.0.0.1:8470 (default: 127.0.0.1 and a free port)")
	cmd.Flags().BoolVar(&o.open, "open", false, "start this computer's browser on the page")
	cmd.Flags().StringVar(&o.circuitOut, "circuit-out", "", "circuit file the save button writes (default: FILE with .explored.yaml)")
	cmd.Flags().StringVar(&o.reportOut, "report-out", "", "HTML file the report button writes (default: FILE with .explored.html)")
	addSetFlag(cmd, &o.sets)
	return cmd
}

// runExplore serves the explorer for o.file until ctx is done, its files
// guarded by g. ready, when not nil, is called with the page's URL once
// the server listens.
func runExplore(ctx context.Context, g *fileGuard, out, errw io.Writer, o exploreOptions, ready func(url string)) error {
	if _, err := g.loadCircuit(errw, o.file, o.sets, ""); err != nil {
		return err
	}
	src, err := os.ReadFile(o.file)
	if err != nil {
		return inputError(err)
	}
	s, err := explore.NewSession(o.file, src, o.sets)
	if err != nil {
		if plan.IsRequest(err) {
			return planError(err)
		}
		return inputError(err)
	}
	circuitOut, reportOut := explore.SavePaths(o.file)
	o.circuitOut, o.reportOut = cmp.Or(o.circuitOut, circuitOut), cmp.Or(o.reportOut, reportOut)
	if err := g.checkOutputsEarly("", o.circuitOut, o.reportOut); err != nil {
		return err
	}
	addr, err := explore.LoopbackAddress(o.listen)
	if err != nil {
		return inputError(fmt.Errorf("flag --listen: %w", err))
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return inputError(fmt.Errorf("flag --listen: %w", err))
	}
	defer ln.Close()
	bound := ln.Addr().String()
	url := "http://" + bound + "/"
	h := explore.Handler(s, explore.Settings{
		Hosts:       explore.Hosts(bound),
		CircuitPath: o.circuitOut,
		SaveCircuit: func(data []byte) error { return writeWhole(g, o.circuitOut, data) },
		ReportPath:  o.reportOut,
		SaveReport:  func(data []byte) error { return writeWhole(g, o.reportOut, data) },
	})
	fmt.Fprintf(out, "qpoint explore: %s\n  open %s in a browser on this computer; Ctrl-C stops the server\n  the save button writes %s, the report button %s\n",
		o.file, url, o.circuitOut, o.reportOut)
	if o.open {
		if err := explore.OpenBrowser(url); err != nil {
			fmt.Fprintf(errw, "qpoint: could not start a browser (%v); open %s yourself\n", err, url)
		}
	}
	if ready != nil {
		ready(url)
	}
	err = explore.Serve(ctx, ln, h)
	if errors.Is(err, explore.ErrStopped) {
		return analysisError(err)
	}
	return err
}

// writeWhole writes data to path whole or not at all.
func writeWhole(g *fileGuard, path string, data []byte) error {
	return g.writeFileAtomic(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}
