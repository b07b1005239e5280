"""JSON Schemas (draft 2020-12) of the machine-readable outputs, shipped in the package.

``results.schema.json`` describes ``data/results.json`` (tag ``sdofreport/results@1``),
``manifest.schema.json`` describes ``manifest.json`` (tag ``sdofreport/manifest@1``) and
``comparison.schema.json`` the document of ``sdofreport compare --format json`` (tag
``sdofreport/comparison@1``). ``sdofreport schema NAME`` prints one; the tests validate
the documents the test-suite builds against them.
"""

from __future__ import annotations

import json
from importlib import resources

from sdofreport.errors import SdofreportError

#: Schema name -> file inside this package.
SCHEMA_FILES: dict[str, str] = {
    "results": "results.schema.json",
    "manifest": "manifest.schema.json",
    "comparison": "comparison.schema.json",
}

#: Schema names, in the order the CLI lists them.
SCHEMA_NAMES: tuple[str, ...] = tuple(SCHEMA_FILES)


def schema_text(name: str) -> str:
    """
    The text of one schema, exactly as shipped.

    Parameters
    ----------
    name : {"results", "manifest", "comparison"}
        Which schema. [-]

    Returns
    -------
    str
        The JSON text (UTF-8 decoded), ending with a newline. [-]

    Raises
    ------
    SdofreportError
        If ``name`` is not a known schema.
    """
    if name not in SCHEMA_FILES:
        raise SdofreportError(f"unknown schema {name!r}; expected one of "
                              f"{', '.join(SCHEMA_NAMES)}.")
    return resources.files(__name__).joinpath(SCHEMA_FILES[name]).read_text(encoding="utf-8")


def load_schema(name: str) -> dict:
    """The schema ``name`` (see :data:`SCHEMA_NAMES`) as a dict."""
    return json.loads(schema_text(name))
