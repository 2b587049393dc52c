"""The pinned constants datasets (CODATA 2018 and 2022 with IAU astronomical values)."""

from worksheet.constants.dataset import (
    DATASET_NAMES,
    DEFAULT_DATASET,
    Constant,
    Dataset,
    UnitDefinition,
    load_dataset,
    parse_dataset_text,
    read_dataset_files,
)
from worksheet.constants.listing import constant_record, format_constants_table

__all__ = [
    "DATASET_NAMES",
    "DEFAULT_DATASET",
    "Constant",
    "Dataset",
    "UnitDefinition",
    "constant_record",
    "format_constants_table",
    "load_dataset",
    "parse_dataset_text",
    "read_dataset_files",
]
