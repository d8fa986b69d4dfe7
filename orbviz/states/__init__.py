"""States: radial and angular functions, the spec grammar and every kind of orbital."""
