package main

// Upper bounds of the flags that set an amount of work, so that a typing
// slip (an extra zero or three) is a clear usage error instead of hours of
// work or a process killed for its memory. Measured on the demo data (one
// core, this tree): 10⁵ bootstrap resamples of one profile take about 5 s
// and 50 MB; 10⁶ Monte Carlo draws of one part about 1 s and 30 MB; 10⁴
// Matano resamples about 11 s. README states them.
const (
	maxResamples = 100_000   // --resamples of fit, arrhenius, compare, campaign, demo and matano
	maxDraws     = 1_000_000 // backcalc --draws
	maxPoints    = 10_000    // predict --points
)

// atMost refuses a count above its bound, naming the flag.
func atMost(flag string, v, max int) error {
	if v > max {
		return usagef("%s %d is more than the limit of %d (more would not change the answer at the precision reported, only the time and memory it takes)", flag, v, max)
	}
	return nil
}
