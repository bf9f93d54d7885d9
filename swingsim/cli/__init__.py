"""The command line: argument parsing and printing only, one module per command."""
