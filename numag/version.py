"""The version of numag, in a module of its own so that any module can import it without a cycle.

Examples
--------
>>> from numag.version import __version__
>>> __version__.count(".")
2
"""

__version__ = "0.1.0"
