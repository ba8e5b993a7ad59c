package profile

// History is a furnace or service log: temperature against time.
type History struct {
	Source string
	Time   []float64 // s from the start of the log, strictly increasing
	Temp   []float64 // K
	Line   []int     // 1-based source line of each row
}
