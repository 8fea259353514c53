"""Interface layer: command line, plots."""
