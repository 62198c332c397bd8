"""windsheet: size a coil order, print its traveller, sign off what was measured."""

__version__ = "0.1.0"
