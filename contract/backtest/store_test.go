package backtest

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestStoreLookupMatchesMaps replays random rows through the store's
// lookup and add, and checks them against Go maps kept beside: the
// forecast's id is the order in which the forecast was first seen (-0 and
// +0 one forecast), "new" is true exactly the first time, and every
// (forecaster, forecast) entry ends with the outcome counts the map
// counted. Forecasts are on a 5 % menu (repeated by every forecaster, so
// the table of pairs finds them) or with three decimals (mostly new), and
// thousands of forecasters so that the tables grow and rehash.
func TestStoreLookupMatchesMaps(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 9))
	const n = 3
	s := newOutcomeStore(n, 0, 1<<22, &spillFile{})
	ids := map[[n]float64]int{}
	counts := map[[2]int][n]uint32{}
	for row := range 200_000 {
		var p [n]float64
		if rng.IntN(8) == 0 {
			a, b := rng.IntN(1001), rng.IntN(1001)
			a, b = min(a, b), max(a, b)
			p = [n]float64{float64(a) / 1000, float64(b-a) / 1000, float64(1000-b) / 1000}
		} else {
			a, b := rng.IntN(21), rng.IntN(21)
			a, b = min(a, b), max(a, b)
			p = [n]float64{float64(a) / 20, float64(b-a) / 20, float64(20-b) / 20}
		}
		key := p
		if p[0] == 0 && rng.IntN(2) == 0 {
			p[0] = math.Copysign(0, -1) // the same forecast as +0
		}
		f, y := rng.IntN(3000), rng.IntN(n)
		wantID, seen := ids[key]
		if !seen {
			wantID = len(ids)
			ids[key] = wantID
		}
		id, made := s.lookup(f, p[:])
		if id != wantID || made == seen {
			t.Fatalf("row %d: forecast %v of forecaster %d: id %d, new %v; want id %d, new %v", row, p, f, id, made, wantID, !seen)
		}
		if err := s.add(f, id, y); err != nil {
			t.Fatal(err)
		}
		c := counts[[2]int{f, id}]
		c[y]++
		counts[[2]int{f, id}] = c
	}
	if len(s.runs) > 0 || len(s.pairs.keys) != len(counts) {
		t.Fatalf("%d entries (%d runs spilled), want %d in memory", len(s.pairs.keys), len(s.runs), len(counts))
	}
	for e, key := range s.pairs.keys {
		want := counts[[2]int{int(key >> 32), int(uint32(key))}]
		if got := [n]uint32(s.hits[e*n : (e+1)*n]); got != want {
			t.Fatalf("forecaster %d, forecast %d: counts %v, want %v", key>>32, uint32(key), got, want)
		}
	}
}
