package main

import (
	"fmt"
	"strings"

	"scorewright/contract/research/study"
	"scorewright/internal/num"
	"scorewright/internal/textcol"
)

type researchStepsJSON struct {
	Buys         bool      `json:"buys"`
	Observations num.Float `json:"observations"`
	Error        num.Float `json:"error"`
	ErrorBefore  num.Float `json:"error_without_research"`
	Pay          num.Float `json:"expected_pay"`
	Spent        num.Float `json:"spent"`
	AtCap        num.Float `json:"chance_at_cap"`
}

type researchRuleJSON struct {
	Name        string             `json:"name"`
	A           num.Float          `json:"A"`
	B           num.Float          `json:"B"`
	Gain        num.Float          `json:"gain"`
	Divergence  num.Float          `json:"expected_divergence"`
	CostWith    num.Float          `json:"cost_with_research"`
	CostWithout num.Float          `json:"cost_without_research"`
	Share       num.Float          `json:"share_of_cost"`
	Season      researchSeasonJSON `json:"season"`
	Steps       *researchStepsJSON `json:"steps,omitempty"`
	Verdict     string             `json:"verdict,omitempty"`
}

type researchSeasonJSON struct {
	Forecasts   int       `json:"forecasts"`
	Gain        num.Float `json:"gain"`
	CostWith    num.Float `json:"cost_with_research"`
	CostWithout num.Float `json:"cost_without_research"`
}

type researchOptimumJSON struct {
	Formula    string        `json:"formula"`
	Pieces     [][]num.Float `json:"pieces"`
	Gain       num.Float     `json:"gain"`
	LPValue    num.Float     `json:"lp_value"`
	Grid       int           `json:"grid"`
	Nodes      int           `json:"nodes"`
	Cells      int           `json:"cells"`
	Rows       int           `json:"rows"`
	Mix        num.Float     `json:"mix"`
	MixFormula string        `json:"mix_formula"`
	MixCost    num.Float     `json:"mix_cost"`
	Written    string        `json:"written,omitempty"`
}

type researchJSON struct {
	Outcomes []string             `json:"outcomes"`
	BaseRate []num.Float          `json:"base_rate"`
	Model    string               `json:"model"`
	Floor    num.Float            `json:"floor"`
	Cap      num.Float            `json:"cap"`
	Rules    []researchRuleJSON   `json:"rules"`
	LeftOut  []string             `json:"left_out"`
	Optimum  *researchOptimumJSON `json:"optimum,omitempty"`
	Notes    []string             `json:"notes"`
}

func researchJSONOf(rep *study.Report, verdicts map[string]string, written string) researchJSON {
	out := researchJSON{Outcomes: rep.Labels, BaseRate: num.Floats(rep.Prior), Model: rep.Model,
		Floor: num.Float(rep.Budget.Floor), Cap: num.Float(rep.Budget.Cap), LeftOut: rep.LeftOut, Notes: rep.Notes}
	if out.LeftOut == nil {
		out.LeftOut = []string{}
	}
	for _, r := range rep.All() {
		g := r.Gain
		j := researchRuleJSON{Name: r.Name, A: num.Float(g.A), B: num.Float(g.B), Gain: num.Float(g.PerForecast),
			Divergence: num.Float(g.Divergence), CostWith: num.Float(g.CostWith), CostWithout: num.Float(g.CostWithout), Share: num.Float(g.Share),
			Season:  researchSeasonJSON{Forecasts: g.Season.Forecasts, Gain: num.Float(g.Season.Gain), CostWith: num.Float(g.Season.CostWith), CostWithout: num.Float(g.Season.CostWithout)},
			Verdict: verdicts[r.Name]}
		if st := r.Steps; st != nil {
			j.Steps = &researchStepsJSON{Buys: st.Buys, Observations: num.Float(st.Steps), Error: num.Float(st.Error), ErrorBefore: num.Float(st.Before),
				Pay: num.Float(st.Pay), Spent: num.Float(st.Spent), AtCap: num.Float(st.AtCap)}
		}
		out.Rules = append(out.Rules, j)
	}
	if o := rep.Optimum; o != nil {
		oj := &researchOptimumJSON{Formula: o.Design.Formula, Gain: num.Float(o.Result.Gain), LPValue: num.Float(o.Result.LPValue),
			Grid: o.Result.Grid, Nodes: o.Result.Nodes, Cells: o.Result.Cells, Rows: o.Result.Rows,
			Mix: num.Float(o.Mix), MixFormula: o.MixDesign.Formula, MixCost: num.Float(o.MixCost), Written: written}
		for _, p := range o.Result.Pieces {
			oj.Pieces = append(oj.Pieces, num.Floats(p))
		}
		out.Optimum = oj
	}
	return out
}

func printResearch(e *env, rep *study.Report, verdicts map[string]string, written string) error {
	w := e.stdout
	menu := fmt.Sprintf("the menu of step %g", rep.Budget.Step)
	if rep.MenuFile != "" {
		menu = rep.MenuFile
	}
	fmt.Fprintf(w, "base rate %s over %s; budget [%g, %g] on %s\n", num.Format(rep.Prior), strings.Join(rep.Labels, ", "), rep.Budget.Floor, rep.Budget.Cap, menu)
	fmt.Fprintf(w, "research model: %s\n\n", rep.Model)
	rows := rep.All()
	season := 1
	if len(rows) > 0 {
		season = rows[0].Gain.Season.Forecasts
	}
	tw := textcol.NewWriter(w, textcol.AlignRight)
	fmt.Fprintf(tw, "rule\tgain/forecast\tcost with\tcost without\tgain/season (%d)\tcost/season\t", season)
	steps := len(rows) > 0 && rows[0].Steps != nil
	if steps {
		fmt.Fprint(tw, "observations\terror\t")
	}
	fmt.Fprintln(tw)
	for _, r := range rows {
		g := r.Gain
		fmt.Fprintf(tw, "%s\t%.4g\t%.4g\t%.4g\t%.4g\t%.4g\t", r.Name, g.PerForecast, g.CostWith, g.CostWithout, g.Season.Gain, g.Season.CostWith)
		if st := r.Steps; st != nil {
			fmt.Fprintf(tw, "%.3g\t%.4g\t", st.Steps, st.Error)
		}
		fmt.Fprintln(tw)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if steps {
		fmt.Fprintf(w, "\nwithout research the report's expected error is %.4g\n", rows[0].Steps.Before)
	}
	for _, l := range rep.LeftOut {
		fmt.Fprintln(w, "left out:", l)
	}
	if o := rep.Optimum; o != nil {
		fmt.Fprintf(w, "\nbest bounded rule for research: gain %.6g per forecast (program value %.6g), %d pieces\n", o.Result.Gain, o.Result.LPValue, len(o.Result.Pieces))
		for i, p := range o.Result.Pieces {
			if i == 8 {
				fmt.Fprintf(w, "  ... %d more\n", len(o.Result.Pieces)-8)
				break
			}
			fmt.Fprintf(w, "  piece %d pays %s\n", i+1, num.Format(p))
		}
		fmt.Fprintf(w, "  formula: %s\n", o.Design.Formula)
		for _, name := range []string{o.Row.Name, o.MixRow.Name} {
			fmt.Fprintf(w, "  check of %s: %s\n", name, verdicts[name])
		}
		if written != "" {
			fmt.Fprintf(w, "  written to %s (scorewright check/table --design %s)\n", written, written)
		}
	}
	fmt.Fprintln(w)
	for _, n := range rep.Notes {
		fmt.Fprintln(w, "note:", n)
	}
	return nil
}
