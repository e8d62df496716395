"""numag: where is a variety singular? Numerical algebraic geometry by homotopy continuation."""

__version__ = "0.1.0"
