"""The optimisation problem: thermodynamic flux problem on the cobra model's optlang problem."""

from .builder import ThermoProblem
from .options import DEFAULT_MIN_DRIVING_FORCE, ProblemOptions, Solution
from .solvers import DEFAULT_SOLVER, InfeasibleProblem, available_solvers

__all__ = ["DEFAULT_MIN_DRIVING_FORCE", "DEFAULT_SOLVER", "InfeasibleProblem", "ProblemOptions",
           "Solution", "ThermoProblem", "available_solvers"]
