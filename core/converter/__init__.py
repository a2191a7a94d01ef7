"""Hydrodynamic torque converters: tables, matching, the drive they give, operating map."""
