"""Headless tests of the notebook panels: built and driven from Python, no browser."""
