"""What the `new` and `synthesize` commands make: the starter project and synthetic
records matched to a target (library code; the commands live in :mod:`sdofreport.cli`)."""
