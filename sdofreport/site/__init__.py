"""Static review site: page contexts, figures, notes and rendering."""
