"""Analyses: the shared, expensive per-run results that rules, figures and characteristics read.

Each analysis is a pure function of the model and the envelope (launch paths and their
full-wave solutions, window responses over frequency and the layers' spreads, the magnet's
on-axis profiles and trap geometry, the parts of a feed's power, the leak estimate, the ray
study, the inductive load envelopes), holds no verdict, and is cached once per run in the
run's ``_cache`` under its own key. This layer sits between physics/magnet and rules: rules
and the report read analyses; no module here imports :mod:`rfcheck.rules`.
"""
