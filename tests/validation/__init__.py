"""Validation of fvheat against outside references (standards, textbooks, other libraries)."""
