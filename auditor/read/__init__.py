"""read stage."""
