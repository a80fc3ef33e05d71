"""Output layer: human-readable summaries, JSON, plots (matplotlib loaded only when plotting)."""
