"""Pure engineering computations, one module per physical topic.

Nothing here reads files, parses YAML or renders anything: every function takes
plain numbers (SI units unless the parameter name says otherwise) and returns
numbers or small frozen dataclasses. Invalid physical input raises
:class:`ComputationError` with a message that says what is wrong.
"""

from ._errors import ComputationError

__all__ = ["ComputationError"]
