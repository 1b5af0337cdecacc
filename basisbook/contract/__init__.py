"""The contract every layer shares: the calc spec types and the error types.

``spec`` declares what a calc module is (inputs, outputs, steps, checks, references,
cautions, figures, tables) and how a check's verdict is reached; ``errors`` holds the
input problems that reach the user as ``file:line: [key] message`` with exit code 2.
This package imports nothing else of basisbook: the calc modules (``basisbook.calcs``)
import only this package, and every other layer builds on it.
"""
