"""Evaluation: heat flows, surface temperatures, probes and balances from a solved field."""
