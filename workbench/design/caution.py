"""The caution every verdict carries: the panel, the record and the command all show it."""

#: Shown with every result and verdict (panel, record, command line); defined here only.
CAUTION = (
    "These results are an aid to design, not a design approval. Verify them against the "
    "applicable codes and standards and licensed professional practice before use; a qualified "
    "engineer is responsible for the design."
)

#: The mark of a design-rule value (a range limit, a coefficient) that could not be read in a
#: published table; every source string carrying such a value ends with it. Defined here only.
NOT_TRACED = "(not traced to a published table — confirm against the applicable standard)"
