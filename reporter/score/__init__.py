"""Score: explicit mentions + semantic alignment per publication and goal, with evidence."""

from reporter.score.parts import ScoringParts, load_scoring_parts
from reporter.score.scoring import Scores, ScoringMethod, score

__all__ = ["Scores", "ScoringMethod", "ScoringParts", "load_scoring_parts", "score"]
