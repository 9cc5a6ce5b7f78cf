"""Administration of a registry: edits and retractions, history, verify, backup and restore."""
