"""Machine-readable outputs of a run: results.json and its inputs block, the CSV tables
and the one JSON text format every JSON file of the package is written in."""
