"""Imports the modules that register project-file parts and check sections.

Each part module registers itself on import (see DEVELOPERS.md, "Adding a
part to the project file"); list it here.
"""
