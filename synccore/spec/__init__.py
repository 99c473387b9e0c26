"""The timing description format — its types, fields, YAML reading and validation.

Later stages import from this package only (never from its underscored modules):

* the types of a validated description (:class:`Spec`, :class:`Axis`, ...) and the
  format's allowed values;
* the located YAML nodes and the checking helpers the resolution step in
  :mod:`synccore.timings` shares with the validator;
* :func:`validate`, which turns an explicit-form document into a :class:`Spec`.

Reading a file end to end (YAML, then ``standard:``/``formula:``/ranges resolved,
then validation) is :func:`synccore.timings.load`.
"""

from synccore.spec._check import (
    Collector,
    check_section,
    describe_node,
    field_names,
    parse_frequency,
    where,
)
from synccore.spec._fields import (
    FIT_FIELDS,
    FORMULA_FIELDS,
    MODE_FIELDS,
    SHARED_FIELDS,
    SPEC_FIELDS,
    TIMING_KEYS,
    Field,
)
from synccore.spec._names import identifier_problem
from synccore.spec._types import (
    BASE_PORTS,
    FAMILY_NAMES,
    FORMULA_METHODS,
    MAX_AXIS,
    MAX_MODES,
    MAX_PIXEL_CLOCK_HZ,
    MIN_MODES,
    MULTI_MODE_PORTS,
    PIXELS_PER_CLOCK,
    POLARITIES,
    RESETS,
    SCALES,
    VSYNC_ALIGNS,
    Axis,
    Board,
    Color,
    CoreOptions,
    Fit,
    Spec,
    ValueRange,
    from_dict,
    to_dict,
)
from synccore.spec._validate import top_mapping, validate
from synccore.spec._yaml import (
    MAX_FILE_BYTES,
    Located,
    Node,
    Refused,
    Scalar,
    load_file,
    load_text,
    read_bounded,
)

__all__ = [
    "BASE_PORTS", "FAMILY_NAMES", "FIT_FIELDS", "FORMULA_FIELDS", "FORMULA_METHODS",
    "MAX_AXIS", "MAX_FILE_BYTES", "MAX_MODES", "MAX_PIXEL_CLOCK_HZ", "MIN_MODES", "MODE_FIELDS",
    "MULTI_MODE_PORTS", "PIXELS_PER_CLOCK", "POLARITIES", "RESETS", "SCALES", "SHARED_FIELDS",
    "SPEC_FIELDS", "TIMING_KEYS", "VSYNC_ALIGNS",
    "Axis", "Board", "Collector", "Color", "CoreOptions", "Field", "Fit", "Located", "Node",
    "Refused", "Scalar", "Spec", "ValueRange",
    "check_section", "describe_node", "field_names", "from_dict", "identifier_problem",
    "load_file", "load_text", "parse_frequency", "read_bounded", "to_dict", "top_mapping", "validate",
    "where",
]  # fmt: skip
