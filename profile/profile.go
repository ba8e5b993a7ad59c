package profile

// Profile is one measured depth profile from one specimen.
type Profile struct {
	ID       string // specimen or profile identifier
	Source   string // file name, with ":sheet" appended for workbooks
	Material string
	Lot      string
	// Quantity names what was measured, e.g. "C", "N", "hardness".
	Quantity string

	// Temperature is the hold temperature in K; 0 means not given.
	Temperature float64
	// TemperatureSigma is the standard uncertainty of Temperature in K; 0 means not given.
	TemperatureSigma float64
	// Time is the hold time in s; 0 means not given.
	Time float64
	// Thickness is the specimen thickness in m; 0 means not given.
	Thickness float64

	// ValueName is the header of the value column as written in the file ("C_wt%").
	ValueName string
	// ValueUnit is the unit of the measured values as far as it can be told
	// from the header ("wt%", "at%", "HV", "HV0.5", "HRC"…); "" when unknown.
	ValueUnit string

	Depth []float64 // m, in file order
	// Across is true when the depth column is a position across an
	// interface (a diffusion couple: header "position_<unit>"); such
	// positions may be negative.
	Across bool
	Value  []float64 // ValueUnit
	// Sigma holds the standard uncertainty of each value (ValueUnit);
	// nil when the file has no sigma column.
	Sigma []float64
	// Line holds the 1-based source line (CSV) or row (XLSX) of each point,
	// so later stages can point at the offending row.
	Line []int

	// Meta holds every metadata key and value as read (keys lower-case),
	// including ones the reader does not interpret, e.g. "unknown" or a
	// grouping column used with --by.
	Meta map[string]string

	// BelowLimit lists the values written below a detection limit ("<0.01",
	// "n.d."), left out of Depth and Value.
	BelowLimit []BelowLimit
	// Notes are remarks on the reading or conversion that the profile's
	// results carry as warnings.
	Notes []Note
}

// Len returns the number of points.
func (p *Profile) Len() int { return len(p.Depth) }
