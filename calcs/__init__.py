"""Calculation modules (installed as ``basisbook.calcs``): one topic per module, each
declaring SPEC and compute().

Modules here import only numpy, the standard library and ``basisbook.contract``;
heavy libraries (CoolProp) are imported inside ``compute`` so that validating a
project stays cheap.  Nothing here knows about HTML or the renderer.
"""
