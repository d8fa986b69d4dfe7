"""Levels: the signed field on a grid and the density level that encloses a probability."""
