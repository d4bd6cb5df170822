"""acceptance: commissioning readings to computed verdicts, an offline site and PDF records."""

__version__ = "0.1.0"

__all__ = ["__version__"]
