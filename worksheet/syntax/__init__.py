"""The statement language: tokenizer, parser and the tree they build (no evaluation)."""

from worksheet.syntax.parser import parse_expression, parse_statement
from worksheet.syntax.units import parse_unit

__all__ = ["parse_expression", "parse_statement", "parse_unit"]
