// Package tui is scorewright's workbench: the terminal screen where a
// contract designer states a scoring rule, sees it drawn, has it checked
// and fits it to a budget.
//
// The root Model owns the layout, the design being edited and the global
// keys; each pane (design, picture, checks, budget) owns its chrome and
// exposes SetSize, Focus/Blur and its key help. Update only routes
// messages: every computation — compiling the formula, sampling the
// picture, running the checks, fitting the budget, writing files — runs in
// a tea.Cmd that answers with a typed message stamped with the generation
// number of the design it was computed for, so that answers for an
// outdated design are dropped. Running checks are cancelled through their
// context as soon as the design changes.
//
// Settings, styles and the key map are passed to the panes explicitly;
// the package keeps no mutable state of its own.
package tui
