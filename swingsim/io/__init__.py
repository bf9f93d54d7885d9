"""File-system plumbing: atomic writes, the output-folder guard."""
