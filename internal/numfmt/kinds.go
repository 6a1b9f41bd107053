package numfmt

import "math"

// One formatter per kind of quantity. The command line, the workbench and
// the annexes write a quantity of one kind through the function below, so
// that it shows the same digits wherever a person reads it. A new place
// that prints one of these quantities calls its function; a new kind gets
// its own function here.
//
//	kind                                               function     digits
//	amount of money in a table or a total              Amount       the currency unit's decimals
//	expected or mean pay (finer than the currency)     Pay          6 significant
//	effort, score, a check's worst value, the terms    Effort       6 significant
//	  of a decomposition (uncertainty, resolution, ...)
//	probability, a report's or belief's coordinate     Probability  6 significant
//	statistic of a history: mean pay per forecast,     Statistic    4 significant
//	  mean effort and its decomposition, CORP terms,
//	  an observed base rate
//	re-check margin (how far a row beats its rivals)   Margin       6 significant
//	distortion of a report, in probability points      Points       3 significant

// Amount writes an amount of money with decimals decimals, the currency
// unit's (0.01 gives 2); a negative count (no rounding unit) writes six
// significant digits.
func Amount(v float64, decimals int) string {
	if decimals < 0 {
		return Significant(v, 6)
	}
	return Fixed(v, decimals)
}

// Pay writes an expected pay or a mean of amounts over many forecasts:
// finer than the currency, so six significant digits.
func Pay(v float64) string { return Significant(v, 6) }

// Effort writes an effort or score at a report and what is made of them:
// a check's worst value, an honesty gap's witness.
func Effort(v float64) string { return Significant(v, 6) }

// Statistic writes a number measured on a history of forecasts (a mean pay
// per forecast, a mean effort and its decomposition, a CORP term, an
// observed base rate): four significant digits, as many as a sample of
// forecasts supports, and noise below a relative 1e-9 of scale written 0
// (a within-bin term that is zero up to the rounding of a sum).
func Statistic(v, scale float64) string {
	if _, bad := special(v); !bad && math.Abs(v) <= 1e-9*math.Abs(scale) {
		return "0"
	}
	return Significant(v, 4)
}

// Probability writes one probability, base rate or chance in prose.
func Probability(v float64) string { return Significant(v, 6) }

// Margin writes a re-check margin: the least by which a row's expected
// pay beats its closest rival for a forecaster who believes the row. It is
// exact arithmetic on rounded amounts (0.21875 for amounts in halves), not
// a sample, so it keeps six digits: four would show one margin as 0.2188
// and its mirror image, a rounding error below it, as 0.2187.
func Margin(v float64) string { return Significant(v, 6) }

// MarginColumn writes a column of margins (a table's rows) with one count
// of decimals, the fewest that write every one of them up to binary noise
// (at most six), so that the column reads as one quantity: 0.240 beside
// 0.235, not 0.24.
func MarginColumn(vs []float64) []string {
	d := Decimals(vs, 6)
	out := make([]string, len(vs))
	for i, v := range vs {
		out[i] = Fixed(v, d)
	}
	return out
}

// Points writes a distortion of a report in probability points.
func Points(v float64) string { return Significant(v, 3) }
