"""The engine: torque curves and their correction to standard air."""
