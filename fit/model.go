package fit

// Param describes one parameter of a Model.
type Param struct {
	// Name is the stable name used in flags and JSON: "D", "Cs", "C0", "x0",
	// "beta", "Cp", "M", "CL", "CR", "xm", "k".
	Name string
	// Log is true when the solver works on ln(value); such a parameter must be
	// positive (D, beta, M). Intervals found on the log scale map back by exp.
	Log bool
	// Unit is the reported unit. "value" stands for the profile's own value
	// unit (wt%, HV…) and "value*m" for that unit times metres (thin-film M).
	Unit string
	// Free tells whether the parameter is fitted by default; parameters that
	// are not free by default hold the value Start gives (x0 = 0) unless freed.
	Free bool
}

// Data is what a model is evaluated on: one profile in SI units.
type Data struct {
	X []float64 // depth, m
	Y []float64 // measured values, profile unit
	// W holds weights 1/σᵢ²; nil means unweighted.
	W []float64
	// Time is the hold time in s. When the time is unknown it is 1 and the
	// fitted "D" is really the product Dt (m²), which Result says plainly.
	Time float64
	// Thickness is the specimen thickness in m (finite-body models); 0 = not given.
	Thickness float64
	// Faces is the number of exposed faces for the slab model (1 or 2).
	Faces int
}

// Model is a solution of Fick's second law written as a function of depth.
// A model is a small value: it knows its parameters, guesses a start from
// the data and evaluates values and the Jacobian; the solver and the
// statistics never know which model it is.
type Model interface {
	// Name is the model's flag name: "erf", "masstransfer", "thinfilm",
	// "couple", "slab", "numeric".
	Name() string
	// Params lists the parameters in the order used by every parameter vector.
	Params() []Param
	// Start writes starting values (internal scale: ln for Log parameters)
	// into p, len(p) == len(Params()), from the data alone.
	Start(d *Data, p []float64) error
	// Eval writes the model value at each d.X[i] into f[i]. When jac is not
	// nil it also writes ∂f[i]/∂p[j] (internal scale) into jac[i*len(p)+j].
	Eval(p []float64, d *Data, f, jac []float64)
}
