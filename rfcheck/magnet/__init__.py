"""Magnet field sources and resonance geometry."""
