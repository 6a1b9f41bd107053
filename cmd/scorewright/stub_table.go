package main

// Not built yet: answer with a usage error rather than pretending.
func runTable(e *env, args []string) error { return usagef("table is not available in this build yet") }
