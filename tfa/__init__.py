"""tfa: thermodynamic feasibility of ancestral reaction networks."""
__version__ = "0.1.0"
