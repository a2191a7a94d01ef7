"""Where to change gear.

The best shift per gear pair, the shift plan, time-optimal searches, shift windows.
"""
