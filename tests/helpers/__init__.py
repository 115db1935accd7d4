"""Test helpers for the model adapters: invented toy models, a model server, a model script."""
