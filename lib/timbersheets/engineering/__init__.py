"""The engineering: the member and its types, units, loads, materials, sections, analysis,
checks, the design, sizing and load path, calcs and the data tables."""
