"""Studies over many variants: sweep tables, comparisons and rankings, move planning."""
