package balance

import (
	"fmt"
	"path/filepath"
	"testing"

	"qpoint/bias/circuit"
)

func TestDbg(t *testing.T) {
	c, _ := circuit.Load(filepath.Join("..", "..", "testdata", "demo", "detector.yaml"))
	nw := linearise(t, c)
	d := fileDrive(t, c)
	for i, nm := range nw.Names { fmt.Println(i, nm) }
	debugNewton = func(it int, worst float64, alpha float64) { fmt.Println(it, worst, alpha, worstAt) }
	_, err := Solve(nw, d, Settings{MaxIterations: 8})
	t.Log(err)
}
