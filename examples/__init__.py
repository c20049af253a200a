"""Invented example sources, shipped inside the wheel as rfcheck.examples."""
