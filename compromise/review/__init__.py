"""Reviewing: scale effects (regimes, thresholds per condition, consequences, tolerance), the
full answer to a case (:mod:`.answer`) and the words every answer carries (:mod:`.wording`).

Layer 5. May import the explore layer and below; computes what a design review reads, but
formats nothing.
"""
