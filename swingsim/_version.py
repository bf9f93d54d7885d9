"""The version of swingsim, stamped into every output."""

__version__ = "0.1.0"
