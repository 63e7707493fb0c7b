"""The calculation record: nbconvert exporter, signing and verification (no widgets)."""
