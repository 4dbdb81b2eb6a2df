"""Independent certificate check of every solution (numpy only)."""

from .certificate import Certificate, CertificateInput, check_solution, recompute_energies

__all__ = ["Certificate", "CertificateInput", "check_solution", "recompute_energies"]
