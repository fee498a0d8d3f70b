"""The cautions every output carries: results feed compliance and condensation decisions."""

CAUTION = (
    "Results are only as good as the model and its inputs (geometry, material values, "
    "surface conditions). They must be checked by a competent person before use; local "
    "building codes, national annexes and licensed professional practice prevail. "
    "Surface-temperature and condensation results are a screening, not a guarantee "
    "against condensation or mould."
)
