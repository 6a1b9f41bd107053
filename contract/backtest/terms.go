package backtest

import "scorewright/contract/budget"

// TermsScheme is the scheme that pays a history as terms t do (a fitted
// payment table, or its formula without a menu), labelled name: a
// forecast on the menu earns exactly its table entry, one off the menu
// the same formula, A - B·L then rounded.
func TermsScheme(name string, t *budget.Terms) Scheme {
	return Scheme{Name: name, Rule: t.Fit.Rule(), Pay: t.Fit, OnMenu: t.OnMenu(), Low: t.Low, High: t.High,
		Adjust: t.Adjust(), Record: t.Record()}
}
