"""Search layer: design space, constraints on the geometry, standard-shape baselines, Optuna studies and workers."""
