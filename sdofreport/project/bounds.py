"""Bounds on inputs that are absurd rather than merely unusual (issue 15, part 7).

Each is our own choice (no published source); they sit far beyond anything a real
project needs, and refuse inputs whose arithmetic would overflow or whose structure
would exhaust the interpreter.
"""

#: Largest ``records[].scale`` accepted [-]. Suites are scaled by factors of about 0.25
#: to 4 in common practice (no source); 1000 leaves room for unit conversions by scale.
MAX_SCALE = 1e3
#: Deepest spring network accepted (levels of series/parallel groups) [-]. Real
#: structures need a handful; the TOML reader itself fails at a few hundred.
MAX_NETWORK_DEPTH = 32
#: Largest design-spectrum acceleration accepted [g]. Design spectra in use stay within a
#: few g (from memory); 100 g can only be a slip of value or unit.
MAX_SPECTRAL_G = 100.0
#: Most samples in one synthetic record [-]: 1e6 is 10000 s at 0.01 s, or 1000 s at
#: 0.001 s; beyond it the memory of a 2-core, 24 GiB machine runs out.
MAX_SYNTHETIC_SAMPLES = 1_000_000
#: Longest spectrum period accepted [s]. Spectra stop at 10 s or so in common practice
#: (no source); no record lasts long enough to excite 1000 s.
MAX_PERIOD_S = 1e3
