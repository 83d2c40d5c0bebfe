"""Invented demo sites shipped with Tiltyard (JSON site files)."""
