package circuit

import "qpoint/bias/diode"

// Ground is the name of the reference node.
const Ground = "gnd"

// Pos is a place in the circuit file, 1-based.
type Pos struct {
	Line, Col int
}

// Kind is the type of a part.
type Kind int

const (
	Resistor Kind = iota
	Capacitor
	Inductor
	VoltageSource
	CurrentSource
	Diode
)

// String returns the kind as written in the circuit file's `type` key.
func (k Kind) String() string {
	switch k {
	case Resistor:
		return "resistor"
	case Capacitor:
		return "capacitor"
	case Inductor:
		return "inductor"
	case VoltageSource:
		return "voltage_source"
	case CurrentSource:
		return "current_source"
	case Diode:
		return "diode"
	}
	return "unknown"
}

// Part is one element of the circuit.
//
// Nodes holds the two terminals in the order that fixes the part's sign
// convention:
//
//	resistor, capacitor, inductor: between[0], between[1]
//	voltage_source: plus, minus (Value = V(plus) - V(minus))
//	current_source: from, to (Value amperes flow from `from` through the
//	                source into `to`)
//	diode: anode, cathode
type Part struct {
	Kind  Kind
	Name  string
	Nodes [2]string
	Value float64 // ohm, F, H, V or A; unused for diodes
	Model string  // diode model name; diodes only
	Pos   Pos     // position of the part's entry in the file
}

// Model is a named diode model.
type Model struct {
	Name   string
	Params diode.Params
	Pos    Pos
}

// Port is a place where a generator or load with a real reference impedance
// connects between Node and Return.
type Port struct {
	Name      string
	Node      string
	Return    string  // Ground unless the file gives `return`
	Impedance float64 // reference impedance in ohm, > 0
	// ACCoupled keeps the port out of the DC solve (`coupling: ac`).
	ACCoupled bool
	Pos       Pos
	// NoiseTemperatureK is the temperature of the reference resistance as
	// a noise source (`noise_temperature`), when NoiseTemperatureSet;
	// otherwise the standard T0 = 290 K applies. Zero is a noiseless
	// termination.
	NoiseTemperatureK   float64
	NoiseTemperatureSet bool
}

// Level is a signal level: the available power of a port's generator in dBm,
// or a peak voltage.
type Level struct {
	DBm       float64
	PeakVolts float64
	IsPower   bool // true: DBm holds the level; false: PeakVolts does
}

// ResponseDefaults holds the file's defaults for a frequency response
// (analysis.response).
type ResponseDefaults struct {
	Set       bool
	FromHz    float64
	ToHz      float64
	PerDecade int // points per decade; zero when Points is used
	Points    int // linear point count; zero when PerDecade is used
	Pos       Pos
}

// DistortionDefaults holds the file's defaults for a distortion analysis
// (analysis.distortion).
type DistortionDefaults struct {
	Set          bool
	Input        string // port name
	Output       string // port or node name
	OutputIsPort bool   // Output names a port (a port wins over a node of the same name)
	FrequencyHz  float64
	Level        Level
	SecondToneHz float64 // zero when not given
	Pos          Pos
}

// StudyDefaults holds the file's defaults for a bias study
// (analysis.study).
type StudyDefaults struct {
	Set   bool
	Vary  string // "PART.value", "MODEL.parameter_name" or "temperature"
	From  float64
	To    float64
	Steps int
	Log   bool
	Pos   Pos
}

// PulseDefaults holds the file's defaults for a pulse analysis. Rise and Fall
// are 10-90 % times and zero when not given; Period is zero for a single
// pulse.
type PulseDefaults struct {
	Set          bool
	Input        string // port name, "" when not given
	Output       string // port or node name, "" when not given
	OutputIsPort bool
	CarrierHz    float64
	Level        Level
	Width        float64
	Rise, Fall   float64
	Period       float64
	Pulses       int // zero when not given
	Pos          Pos
}

// Analysis holds the optional analysis defaults.
type Analysis struct {
	Response   ResponseDefaults
	Distortion DistortionDefaults
	Study      StudyDefaults
	Yield      YieldDefaults // tolerance.go
	Pulse      PulseDefaults
	Mixer      MixerDefaults // mixer.go
}

// Circuit is a loaded and checked circuit file. All values are in SI base
// units; temperatures in kelvin.
type Circuit struct {
	File         string // path or name the circuit was loaded from
	Name         string
	TemperatureK float64
	Models       map[string]*Model
	ModelOrder   []string // model names in file order
	Parts        []Part
	Ports        []Port
	Probes       []string
	Analysis     Analysis
	// Nodes lists every node other than Ground, in order of first
	// appearance in the file.
	Nodes []string
	// Overrides lists the values set from outside the file (WithOverride),
	// in the order they were applied.
	Overrides []Override
	// Warnings lists what the loader found legal but probably not meant,
	// in file order.
	Warnings []Warning
	// Tolerances lists the values that spread from part to part, in part
	// order, and ToleranceGroups the values that spread together
	// (tolerance.go).
	Tolerances      []Tolerance
	ToleranceGroups []ToleranceGroup
	// Distributed lists the transmission lines, microstrip lines and
	// S-parameter blocks, in file order (distributed.go).
	Distributed []Distributed
	// Transformers lists the file's transformers, whose windings are
	// inductors among Parts, and Couplings their mutual inductances
	// (transformer.go).
	Transformers []Transformer
	Couplings    []Coupling
}
