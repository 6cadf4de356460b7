"""layoutcheck: review a power-stage board layout before it is built.

Units everywhere inside: millimetres, volts, amperes, henries.
"""
__version__ = "0.1.0"
