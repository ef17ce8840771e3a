"""joulebook's domain: units, species data, property models, states,
balances, the solver and the record. Never imports textual or rich."""

__version__ = "0.1.0"
