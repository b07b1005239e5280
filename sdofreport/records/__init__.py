"""Ground-motion records: the Record type, file readers and optional processing.

Units are converted here, once: a :class:`Record` holds acceleration in m/s² and
remembers the units the user declared.
"""

from sdofreport.records.process import process_record
from sdofreport.records.readers import (
    MIN_POINTS,
    RECORD_FORMAT_DESCRIPTIONS,
    RECORD_FORMATS,
    detect_format,
    read_headed,
    read_record,
    read_two_column,
    read_values,
)
from sdofreport.records.record import Record, record_from_array

__all__ = [
    "MIN_POINTS",
    "RECORD_FORMATS",
    "RECORD_FORMAT_DESCRIPTIONS",
    "Record",
    "detect_format",
    "process_record",
    "read_headed",
    "read_record",
    "read_two_column",
    "read_values",
    "record_from_array",
]
