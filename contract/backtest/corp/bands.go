package corp

import (
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"
)

// Default settings of the consistency bands.
const (
	// DefaultResamples is how many times the outcomes are redrawn.
	DefaultResamples = 500
	// DefaultLevel is the share of resampled curves a band holds at each
	// point: 90 %, as in the paper's figures.
	DefaultLevel = 0.9
	// DefaultSeed makes the bands the same from run to run.
	DefaultSeed = 20210413
	// DefaultPoints bounds the probabilities the bands are given at.
	DefaultPoints = 200
)

// BandOptions tune ConsistencyBands. The zero value means the defaults.
type BandOptions struct {
	Resamples int
	Level     float64
	Seed      uint64
	// Points bounds how many of the distinct probabilities the bands are
	// evaluated at (evenly by rank, always the first and last).
	Points int
}

func (o BandOptions) withDefaults() BandOptions {
	if o.Resamples <= 0 {
		o.Resamples = DefaultResamples
	}
	if !(o.Level > 0 && o.Level < 1) {
		o.Level = DefaultLevel
	}
	if o.Seed == 0 {
		o.Seed = DefaultSeed
	}
	if o.Points <= 1 {
		o.Points = DefaultPoints
	}
	return o
}

// CurvePoint is one point of a reliability picture: a forecast
// probability, its PAV-recalibrated value and, when bands were drawn, the
// range that calibrated forecasts would fill.
type CurvePoint struct {
	X, Calibrated float64
	// Lo and Hi bound the middle Level share of recalibrated values at X
	// when the outcomes are drawn from the forecasts themselves; NaN when
	// no bands were asked for.
	Lo, Hi float64
	// Count is the number of forecasts at X.
	Count int
}

// Curve returns the PAV reliability curve of groups (sorted by strictly
// increasing X) at every distinct probability, without bands.
func Curve(groups []Group) []CurvePoint {
	cal := PAV(groups)
	out := make([]CurvePoint, len(groups))
	for i, g := range groups {
		out[i] = CurvePoint{X: g.X, Calibrated: cal[i], Lo: math.NaN(), Hi: math.NaN(), Count: g.Count}
	}
	return out
}

// ConsistencyBands returns the PAV curve at up to opt.Points of the
// distinct probabilities with consistency bands: the outcomes are redrawn
// opt.Resamples times, each group's hits from a binomial with its own
// forecast as the chance (the hypothesis of calibration), every redraw is
// recalibrated by PAV, and the band at X holds the middle opt.Level share
// of the recalibrated values there. A curve leaving its band is evidence of
// miscalibration at that level. Redraws use a PCG generator seeded with
// opt.Seed, so the bands repeat exactly.
func ConsistencyBands(groups []Group, opt BandOptions) []CurvePoint {
	opt = opt.withDefaults()
	cal := PAV(groups)
	at := bandPositions(len(groups), opt.Points)
	rng := rand.New(rand.NewPCG(opt.Seed, uint64(len(groups))))
	draws := make([][]float64, len(at)) // per position, one value per redraw
	for j := range draws {
		draws[j] = make([]float64, opt.Resamples)
	}
	hits := make([]int, len(groups))
	redraw := make([]float64, len(groups))
	stack := make([]block, 0, len(groups))
	for r := range opt.Resamples {
		for i, g := range groups {
			hits[i] = binomial(rng, g.Count, g.X)
		}
		stack = pavInto(redraw, groups, hits, stack)
		for j, i := range at {
			draws[j][r] = redraw[i]
		}
	}
	tail := (1 - opt.Level) / 2
	out := make([]CurvePoint, len(at))
	for j, i := range at {
		d := draws[j]
		sort.Float64s(d)
		out[j] = CurvePoint{X: groups[i].X, Calibrated: cal[i], Lo: quantile(d, tail), Hi: quantile(d, 1-tail), Count: groups[i].Count}
	}
	return out
}

// bandPositions picks up to k of n indices evenly by rank, first and last
// included.
func bandPositions(n, k int) []int {
	if n <= k {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	out := make([]int, k)
	for j := range out {
		out[j] = int(math.Round(float64(j) * float64(n-1) / float64(k-1)))
	}
	return out
}

// binomial draws from Binomial(n, p); a single trial is a Bernoulli draw.
func binomial(rng *rand.Rand, n int, p float64) int {
	switch {
	case p <= 0:
		return 0
	case p >= 1:
		return n
	case n == 1:
		if rng.Float64() < p {
			return 1
		}
		return 0
	}
	return int(distuv.Binomial{N: float64(n), P: p, Src: rng}.Rand())
}

// quantile is the sample quantile of sorted d by linear interpolation
// between order statistics (the "type 7" rule of common practice).
func quantile(d []float64, q float64) float64 {
	if len(d) == 0 {
		return math.NaN()
	}
	h := q * float64(len(d)-1)
	lo := math.Floor(h)
	i := int(lo)
	if i+1 >= len(d) {
		return d[len(d)-1]
	}
	return d[i] + (h-lo)*(d[i+1]-d[i])
}
