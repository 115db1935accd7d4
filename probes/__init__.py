"""Stage 2: run any model on both sides of every pair and judge the expectations."""

from pairflip.probes.adapters import Model, PythonModel, as_model, load_model
from pairflip.probes.cache import PredictionCache
from pairflip.probes.expectations import judge
from pairflip.probes.scoring import distinct_texts, predict_all, score

__all__ = [
    "Model", "PythonModel", "PredictionCache", "as_model", "load_model", "judge", "distinct_texts",
    "predict_all", "score",
]
