"""Choosing parts: setups side by side and final-drive sweeps."""
