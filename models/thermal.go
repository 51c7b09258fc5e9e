package models

import "math"

// Physical constants, exact in the SI since the 2019 redefinition (BIPM SI
// Brochure, 9th ed., table 1).
const (
	Boltzmann        = 1.380649e-23    // J/K
	ElementaryCharge = 1.602176634e-19 // C
	ZeroCelsius      = 273.15          // K
	// NominalTemperature is the temperature at which device parameters are
	// given (25 °C), the usual nominal temperature of device models.
	NominalTemperature = ZeroCelsius + 25
)

// ThermalVoltage returns Vt = k·T/q in volts for T in kelvin.
func ThermalVoltage(t float64) float64 { return Boltzmann * t / ElementaryCharge }

// SaturationCurrentAt scales a junction saturation current given at tnom to
// temperature t, with the junction law of classical circuit simulation
// (L. W. Nagel, UCB ERL-M520, 1975; G. Massobrio & P. Antognetti,
// McGraw-Hill, 2nd ed., 1993, eq. 1.33):
//
//	Is(T) = Is(Tnom)·(T/Tnom)^(XTI/N)·exp((Eg/(N·Vt(T)))·(T/Tnom − 1))
//
// with Eg in eV. eg = 0 disables scaling (Is is then taken as written at
// every temperature, as the chain-file core states it).
func SaturationCurrentAt(is, n, eg, xti, t, tnom float64) float64 {
	if eg == 0 {
		return is
	}
	vt := ThermalVoltage(t)
	return is * math.Pow(t/tnom, xti/n) * math.Exp(eg/(n*vt)*(t/tnom-1))
}

// LeakageAt scales a leakage current given at tnom to temperature t with a
// doubling every `doubling` kelvin (germanium collector–base leakage roughly
// doubles every 10 °C: common practice).
func LeakageAt(i0, doubling, t, tnom float64) float64 {
	if doubling <= 0 {
		return i0
	}
	return i0 * math.Exp2((t-tnom)/doubling)
}
