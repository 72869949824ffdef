"""The run: what a command does from start to end (the runner, what-if, carrying sheets over)."""
