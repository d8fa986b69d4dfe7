"""Figures: off-screen 3D figures, 2D plots and animations (VTK and matplotlib live here)."""
