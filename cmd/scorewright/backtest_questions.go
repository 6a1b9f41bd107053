package main

import (
	"fmt"
	"io"
	"strings"

	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/internal/num"
	"scorewright/internal/textcol"
)

// questionTally adds up what each question cost the buyer under each rule.
// Unlike the rest of the backtest its memory grows with the number of
// distinct questions, which is why it runs only when --by-question asks.
type questionTally struct {
	labels []string
	index  map[string]int
	qs     []*questionSums
}

type questionSums struct {
	name    string
	outcome int
	line    int // first line of the question
	count   int
	totals  []float64
	// conflict is the first line whose outcome disagrees with line's.
	conflict int
}

func newQuestionTally(labels []string) *questionTally {
	return &questionTally{labels: labels, index: map[string]int{}}
}

// add is a backtest.Options.OnRow hook.
func (t *questionTally) add(row *history.Row, paid []backtest.Paid) error {
	i, ok := t.index[row.Question]
	if !ok {
		i = len(t.qs)
		// The row's strings point into a reused buffer.
		name := strings.Clone(row.Question)
		t.index[name] = i
		t.qs = append(t.qs, &questionSums{name: name, outcome: row.Outcome, line: row.Line, totals: make([]float64, len(paid))})
	}
	q := t.qs[i]
	q.count++
	for s, p := range paid {
		q.totals[s] += p.Pay
	}
	if row.Outcome != q.outcome && q.conflict == 0 {
		q.conflict = row.Line
	}
	return nil
}

type questionReport struct {
	Name    string      `json:"name"`
	Outcome string      `json:"outcome"`
	Count   int         `json:"count"`
	Total   []num.Float `json:"total"`
}

// report lists the questions in the order they first appear, and notes
// every question whose rows disagree about what happened.
func (t *questionTally) report() ([]questionReport, []string) {
	var out []questionReport
	var notes []string
	for _, q := range t.qs {
		out = append(out, questionReport{Name: q.name, Outcome: t.labels[q.outcome], Count: q.count, Total: num.Floats(q.totals)})
		if q.conflict != 0 {
			notes = append(notes, fmt.Sprintf("question %q has rows that disagree about the outcome (line %d says %q, line %d another); each row is paid by its own outcome", q.name, q.line, t.labels[q.outcome], q.conflict))
		}
	}
	return out, notes
}

// writeQuestions prints the per-question table of a report.
func (r *backtestReport) writeQuestions(w io.Writer) error {
	if len(r.Questions) == 0 {
		return nil
	}
	fmt.Fprintln(w, "\npaid per question")
	tw := textcol.NewWriter(w, textcol.AlignRight)
	head := "question\toutcome\tforecasts\t"
	for _, rr := range r.Rules {
		head += "total " + rr.ID + "\t"
	}
	fmt.Fprintln(tw, head)
	for _, q := range r.Questions {
		line := fmt.Sprintf("%s\t%s\t%d\t", q.Name, q.Outcome, q.Count)
		for i, v := range q.Total {
			line += r.cash(i, v) + "\t"
		}
		fmt.Fprintln(tw, line)
	}
	return tw.Flush()
}
