"""The calc sheet's content, section by section, and how it is written (LaTeX, HTML, charts, diagrams)."""
