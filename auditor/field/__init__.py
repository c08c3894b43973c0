"""field stage."""
