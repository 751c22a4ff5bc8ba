"""fieldkit: plan low wire dipoles for NVIS HF links, from one model of wire antennas over real ground."""

__version__ = "0.1.0"
