"""Meshes: the figures, checks and load ratings of meshing pairs (pure, numpy)."""
