"""A model module that fails while being imported (for the import-error test)."""

raise RuntimeError("the model weights for the rain-jacket classifier are missing")
