"""The standing caution every output that could be built on carries (no heavy imports)."""

CAUTION = ("Preliminary feasibility estimate, not a design: structural, electrical and fire "
           "safety and the sizing of any installation belong to local codes and licensed "
           "installers.")
