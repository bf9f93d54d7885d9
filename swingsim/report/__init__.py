"""Outputs: summary.json, timeseries.csv, summary.txt and plots (I/O lives here, not in the physics)."""
