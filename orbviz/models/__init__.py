"""Models: printable solids in millimetres."""
