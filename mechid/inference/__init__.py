"""Fitting and model comparison: likelihoods, tempered sampling, evidences, ranking.

The evidence engine (:mod:`mechid.inference.target`, :mod:`mechid.inference.tempering`,
:mod:`mechid.inference.evidence`) is independent of the physics: it sees a
:class:`~mechid.inference.target.Target` with a normalised prior and a vectorised
log-likelihood.
"""
