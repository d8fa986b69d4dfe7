"""Scenes: scene files, the batch runner, its manifest and lock, and the contact sheet."""
