"""sdofreport: single-degree-of-freedom earthquake response checks as a review site."""

__version__ = "0.1.0"
