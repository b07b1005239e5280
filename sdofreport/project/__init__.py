"""Project files: the key registry, the loader and the validated model."""

from sdofreport.project.loader import load_project
from sdofreport.project.model import Project

__all__ = ["Project", "load_project"]
