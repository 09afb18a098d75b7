package mixer

import (
	"time"

	"qpoint/ac/balance"
	"qpoint/ac/steady"
)

// Result is a mixer analysed about its LO-driven operating point. Powers
// are in watts, impedances in ohms (physical phasors, at positive
// frequencies), losses and figures in dB.
type Result struct {
	Settings Settings
	IFHz     float64
	// RFSideband is the RF's sideband index, +1 with the RF above the
	// LO, -1 below it; the image is its opposite.
	RFSideband int

	LO LO
	// ConversionLossDB is the RF generator's available power over the IF
	// power delivered into the IF port's reference resistance, single
	// sideband; ImageConversionLossDB the same for a signal at the image
	// frequency entering the RF port; UpconversionLossDB the IF
	// generator's available power over the power delivered into the RF
	// port's reference at the RF. Positive for a loss.
	ConversionLossDB      float64
	ImageConversionLossDB float64
	UpconversionLossDB    float64
	// RFInputImpedance looks into the RF port at the RF under pump,
	// ImageInputImpedance at the image, IFOutputImpedance into the IF
	// port at the IF, with every other port and sideband terminated.
	RFInputImpedance    complex128
	ImageInputImpedance complex128
	IFOutputImpedance   complex128
	// Noise is the noise at the IF port.
	Noise Noise
	// Diodes holds each diode under the pump, in the network's order.
	Diodes []Diode
	// Cautions lists what the reader must know: ratings exceeded, a
	// breakdown knee reached, figures that did not settle, what the noise
	// leaves out.
	Cautions []Caution
	// Pump is the LO-driven steady state.
	Pump  *balance.Result
	Stats Stats
}

// LO holds the local oscillator's figures at its fundamental.
type LO struct {
	FrequencyHz float64
	// AvailableW is the LO generator's available power; AbsorbedW the
	// power it delivers into the circuit at the fundamental,
	// Re{V I*}/2 at the LO port (what the mixer takes from the LO).
	AvailableW, AbsorbedW float64
	// InputImpedance is V/I at the LO port at the fundamental.
	InputImpedance complex128
	// LeakageToRFW and LeakageToIFW are the LO power at its fundamental
	// delivered into the RF and IF ports' references.
	LeakageToRFW, LeakageToIFW float64
}

// Noise is the mixer's noise at the IF port, with every source at each
// sideband: thermal noise of the resistors and series resistances at the
// circuit temperature and of the ports' terminations at their noise
// temperatures (the RF port's at T0 = 290 K, as a noise figure's source
// is by definition; the IF port's own termination, the next stage's, is
// left out at the IF), and each pumped junction's cyclostationary shot
// noise.
type Noise struct {
	// FigureSSBDB is 10 log10 F with F the output noise over the part of
	// it the RF termination gives at the RF sideband alone;
	// FigureDSBDB the same over the RF and image sidebands together.
	FigureSSBDB, FigureDSBDB float64
	// OutputDensity is the IF port voltage's noise density, V²/Hz, as
	// defined above.
	OutputDensity float64
	// Contributions are each source's part of OutputDensity, largest
	// first.
	Contributions []Contribution
}

// Contribution is one noise source's share of the output noise.
type Contribution struct {
	Source  string // "D1 junction (shot)", "port rf termination (thermal)", ...
	Density float64
	Share   float64 // of OutputDensity
}

// Diode is one diode under the pump.
type Diode struct {
	Name string
	// DCCurrent is the mean junction current (the rectified current with
	// the bias); PeakCurrent the largest forward current;
	// PeakReverseVoltage the largest reverse terminal voltage; MeanPower
	// the mean dissipation.
	DCCurrent, PeakCurrent, PeakReverseVoltage, MeanPower float64
	// BreakdownFraction is the share of the period spent past the
	// breakdown knee.
	BreakdownFraction float64
}

// CautionKind says what a caution concerns.
type CautionKind string

// The kinds of caution.
const (
	StressCaution       CautionKind = "stress"        // a rating or the junction-size rule exceeded (steady.StressCaution)
	BreakdownCaution    CautionKind = "breakdown"     // the pump drives a junction past its knee
	SidebandsUnsettled  CautionKind = "sidebands"     // the figures still moved at the largest sideband count
	HarmonicsUnsettled  CautionKind = "harmonics"     // the pump stopped at its harmonic limit
	FlickerLeftOut      CautionKind = "flicker"       // junction flicker noise is not in the noise figure
	ShootingDisagrees   CautionKind = "shooting"      // the shooting check differs from harmonic balance
	ConversionGainFound CautionKind = "negative-loss" // the conversion has gain: a parametric (capacitive) effect
)

// Caution is one typed caution.
type Caution struct {
	Kind    CautionKind
	Part    string  // the diode concerned, or ""
	Value   float64 // the figure seen
	Limit   float64 // what it exceeds
	Message string
	// Stress is set for a StressCaution.
	Stress *steady.StressCaution
}

// Stats says how the analysis ran.
type Stats struct {
	// Pump is the harmonic balance's own statistics.
	Pump balance.Stats
	// Sidebands is the K of the final conversion (sidebands -K..K);
	// SidebandChange the largest change of a loss or noise figure, in
	// dB, and SidebandImpedanceChange of a port impedance, relative, in
	// the last doubling of K (zero with FixedSidebands).
	Sidebands               int
	SidebandChange          float64
	SidebandImpedanceChange float64
	// Samples is the time grid the junction waveforms were sampled on.
	Samples int
	// Shooting, when CheckShooting ran, is the largest difference between
	// the junction currents of shooting and harmonic balance at DC and
	// the first five harmonics, relative to each junction's largest;
	// NaN when it did not run. ShootingError says why it failed, if it
	// did.
	Shooting      float64
	ShootingError string
	Runtime       time.Duration
}
