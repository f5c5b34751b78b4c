"""The checker: small named rules over loaded records and their analysis."""
