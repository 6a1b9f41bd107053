package main

// Not built yet: answer with a usage error rather than pretending.
func runBacktest(e *env, args []string) error {
	return usagef("backtest is not available in this build yet")
}
