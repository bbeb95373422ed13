"""Shop work over many cases: review, learning, the sweep, replay and the demo shop."""
