"""The one registry of check quantities: what a ``[systems.limits]`` key may check.

Every layer reads this table and keeps no list of its own:

- the key registry (:mod:`sdofreport.project.schema`) builds the ``systems[].limits``
  section from it, so the loader accepts, converts and documents each key;
- the model (:class:`sdofreport.project.model.Limits`) has one SI field per entry;
- the engine reads each record's peak from the entry's ``ResponseResult`` attribute and
  takes the statistic of ``|value|`` for a signed quantity;
- the pages (:mod:`sdofreport.site.display`) show the label and the value in the display
  unit of the entry's dimension;
- ``data/results.json`` and ``data/checks.csv`` write the entry's SI unit, and
  :func:`results_schema_rules` gives the part of ``results.schema.json`` that the table
  decides (a test compares the shipped schema with it).

Adding a quantity is one entry here (plus, where the quantity needs one, a rule in the
loader, such as "a base-shear limit needs the mass"). This module imports nothing from
the package, so every layer above the core may read it.
"""

from __future__ import annotations

from dataclasses import dataclass

#: results.json unit of a check -> suffix of its SI name (``displacement`` ->
#: ``displacement_m``), the key suffixes of results.json.
_SI_SUFFIXES = {"m": "_m", "N": "_n", "m/s2": "_m_s2", "-": ""}


@dataclass(frozen=True)
class CheckQuantity:
    """One quantity a limit may check."""

    #: key under ``[systems.limits]`` and the ``quantity`` of a check in results.json
    key: str
    #: attribute of :class:`sdofreport.engine.ResponseResult` holding the per-record peak
    attribute: str
    #: dimension of the value (a key of ``sdofreport.project.quantities.DIMENSIONS`` and
    #: of the display units); None for a dimensionless ratio
    dimension: str | None
    #: unit of limit and demand in results.json and checks.csv (``"-"`` for ratios)
    si_unit: str
    #: label on the pages
    label: str
    #: the per-record value carries a sign; the statistic is of |value|
    signed: bool
    #: type of the project-file key (``"quantity"``, ``"ratio"`` or ``"number"``)
    key_type: str
    #: text of the project-file reference
    description: str
    #: example value in the project-file reference
    example: str

    @property
    def limit_name(self) -> str:
        """The limit's name in SI: the field of ``Limits`` and the key of results.json's
        ``systems.<id>.limits`` (``displacement_m``, ``drift_ratio``)."""
        return self.key + _SI_SUFFIXES[self.si_unit]


def _table(*quantities: CheckQuantity) -> dict[str, CheckQuantity]:
    return {q.key: q for q in quantities}


#: Every check quantity, by key, in the order limits are read, checked and shown.
CHECK_QUANTITIES: dict[str, CheckQuantity] = _table(
    CheckQuantity("displacement", "peak_displacement_m", "length", "m",
                  "Peak displacement", False, "quantity",
                  "Peak relative displacement limit.", '"40 mm"'),
    CheckQuantity("drift_ratio", "peak_drift_ratio", None, "-", "Peak drift ratio", False,
                  "ratio", "Peak drift ratio limit (displacement/height).", "0.015"),
    CheckQuantity("base_shear", "peak_base_shear_n", "force", "N", "Peak base shear", False,
                  "quantity", "Peak base shear limit (needs the mass).", '"450 kN"'),
    CheckQuantity("total_accel", "peak_total_accel_m_s2", "acceleration", "m/s2",
                  "Peak total acceleration", False, "quantity",
                  "Peak total acceleration limit.", '"0.8 g"'),
    CheckQuantity("ductility", "ductility", None, "-", "Ductility demand", False, "number",
                  "Ductility demand limit μ = max|u|/u_y (yielding systems).", "4.0"),
    CheckQuantity("residual_displacement", "residual_displacement_m", "length", "m",
                  "Residual displacement", True, "quantity",
                  "Residual (final) displacement limit.", '"10 mm"'),
    CheckQuantity("bearing_displacement", "peak_displacement_m", "length", "m",
                  "Bearing displacement", False, "quantity",
                  "sliding-pendulum: displacement capacity of the bearing.", '"250 mm"'),
)


def results_schema_rules() -> dict:
    """
    The parts of ``$defs.check`` in ``results.schema.json`` that this table decides.

    Returns
    -------
    dict
        ``quantity_enum`` (the keys in order), ``unit_enum`` (the SI units, sorted) and
        ``allOf`` (one if/then rule per quantity tying ``unit`` to its SI unit), each as
        the JSON Schema writes it. [-]
    """
    return {
        "quantity_enum": list(CHECK_QUANTITIES),
        "unit_enum": sorted({q.si_unit for q in CHECK_QUANTITIES.values()}),
        "allOf": [{"if": {"properties": {"quantity": {"const": q.key}},
                          "required": ["quantity"]},
                   "then": {"properties": {"unit": {"const": q.si_unit}}}}
                  for q in CHECK_QUANTITIES.values()],
    }
