package main

// Not built yet: the workbench prints the command list.
func runWorkbench(e *env, d any) error {
	printCommands(e.stdout)
	return nil
}
