"""demo stage."""
