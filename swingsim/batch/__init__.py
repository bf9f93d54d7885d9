"""The vectorised batch engine: many variants of a scene integrated at once with numpy."""
