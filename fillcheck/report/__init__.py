"""Renderers of a finished assessment: terminal (rich) and JSON. They compute nothing."""
