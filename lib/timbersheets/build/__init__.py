"""The build: executing notebooks, typesetting, sheet jobs and their cache, the package, the index."""
