"""The engineer's questions, each a function from inputs to result objects, reusable from Python."""

from .simulate import attach_equivalent_severity, simulate, simulate_case

__all__ = ["attach_equivalent_severity", "simulate", "simulate_case"]
