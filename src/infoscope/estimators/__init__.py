"""Estimators: counts and samples -> numbers. Imports numpy and scipy only."""
