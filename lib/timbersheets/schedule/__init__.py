"""The member schedule: reading and validating every cell and row (read.load_schedule)."""
