"""Data files shipped with taxiwright (read with importlib.resources): the demo aircraft library."""
