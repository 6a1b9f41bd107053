package tui

// The engine parts the workbench plugs in. Each returns nil while its
// package is not part of the build; the pane concerned then says so
// instead of pretending.

func defaultChecker() Checker   { return nil }
func defaultFitter() Fitter     { return nil }
func defaultExporter() Exporter { return nil }
