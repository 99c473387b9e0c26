"""Where a timing's numbers come from when a description does not give them.

The VESA DMT and CTA-861 library (:mod:`.modes`), the CVT and GTF formulas
(:mod:`.formulas`), fitting a panel datasheet's ranges (:mod:`.panel`), X.Org
modelines (:mod:`.modeline`), and the resolution step that rewrites a description
into explicit numbers (:mod:`.resolve`).  :func:`load` reads a description end to end.
"""

from synccore.timings.reading import load, loads

__all__ = ["load", "loads"]
