package main

// Not built yet: answer with a usage error rather than pretending.
func runAudit(e *env, args []string) error { return usagef("audit is not available in this build yet") }
