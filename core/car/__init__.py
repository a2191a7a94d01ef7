"""The car on the road: vehicle, road load, coast-down fits, traction, rotating inertia, grades."""
