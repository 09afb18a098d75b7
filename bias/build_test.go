package bias

import (
	"fmt"

	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

// net builds circuits in tests without a circuit file.
type net struct {
	c    *circuit.Circuit
	seen map[string]bool
}

func newNet(name string) *net {
	return &net{
		c: &circuit.Circuit{
			File: name, Name: name, TemperatureK: 300.15,
			Models: map[string]*circuit.Model{},
		},
		seen: map[string]bool{circuit.Ground: true},
	}
}

func (n *net) node(names ...string) {
	for _, s := range names {
		if !n.seen[s] {
			n.seen[s] = true
			n.c.Nodes = append(n.c.Nodes, s)
		}
	}
}

func (n *net) part(k circuit.Kind, name, a, b string, value float64) *net {
	n.node(a, b)
	n.c.Parts = append(n.c.Parts, circuit.Part{Kind: k, Name: name, Nodes: [2]string{a, b}, Value: value})
	return n
}

func (n *net) R(name, a, b string, ohm float64) *net {
	return n.part(circuit.Resistor, name, a, b, ohm)
}
func (n *net) V(name, plus, minus string, v float64) *net {
	return n.part(circuit.VoltageSource, name, plus, minus, v)
}
func (n *net) I(name, from, to string, a float64) *net {
	return n.part(circuit.CurrentSource, name, from, to, a)
}
func (n *net) L(name, a, b string, h float64) *net { return n.part(circuit.Inductor, name, a, b, h) }

// model adds a diode model with the given saturation current and ideality
// and the file defaults for the rest; edit returns it for further changes.
func (n *net) model(name string, is, ideality float64) *diode.Params {
	p := diode.Defaults()
	p.SaturationCurrent = is
	p.Ideality = ideality
	n.c.Models[name] = &circuit.Model{Name: name, Params: p}
	n.c.ModelOrder = append(n.c.ModelOrder, name)
	return &n.c.Models[name].Params
}

func (n *net) D(name, anode, cathode, model string) *net {
	n.node(anode, cathode)
	if _, ok := n.c.Models[model]; !ok {
		panic(fmt.Sprintf("test circuit: no model %q", model))
	}
	n.c.Parts = append(n.c.Parts, circuit.Part{Kind: circuit.Diode, Name: name, Nodes: [2]string{anode, cathode}, Model: model})
	return n
}
