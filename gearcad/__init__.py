"""gearcad: from a ratio to gears that mesh and files a machine accepts."""
__version__ = "0.1.0"
