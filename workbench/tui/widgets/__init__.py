"""Panels and small widgets of the workbench screens."""
