"""decide stage."""
