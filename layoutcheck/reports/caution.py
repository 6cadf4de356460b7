"""The safety caution every report carries (text shared by all report formats)."""

CAUTION = (
    "CAUTION: the circuits reviewed here carry lethal voltages and store dangerous energy. "
    "This review is an aid to a person's judgement, not a certification. It checks only what "
    "it could read and only the rules it lists; its tables are reproduced from secondary "
    "sources and some values are marked as recalled from memory. The end-product safety "
    "standard, local electrical codes and licensed practice govern: confirm every spacing "
    "and rating against them before building, and never work on a live or charged board."
)
