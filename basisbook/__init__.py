"""basisbook: a folder of plain-text inputs in, a traceable design-basis handbook out."""

__version__ = "0.1.0"
