"""Low-pressure (vacuum) carburizing: hydrocarbon boosts and nitrogen diffuses planned as a pulse table."""
