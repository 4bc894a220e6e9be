"""The engineer's questions, each a function from inputs to result objects, reusable from Python."""

from .simulate import simulate, simulate_case

__all__ = ["simulate", "simulate_case"]
