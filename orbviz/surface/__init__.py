"""Surface: closed, phase-coloured bodies contoured from the sampled field."""
