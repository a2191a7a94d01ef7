"""From crank to road.

Ratios, tires, per-gear kinematics, chassis-dyno conversion, speedometer, gear spacing.
"""
