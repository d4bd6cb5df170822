"""The one exception type raised by the pure computations."""


class ComputationError(ValueError):
    """Physically impossible or out-of-domain input to a computation.

    The message names the parameter and the value and says what is allowed,
    e.g. ``"winding_temperature -300 °C is below absolute zero (-273.15 °C)"``.
    """
