"""Scenes: scene files, the batch runner and the contact sheet."""
