"""Published models and material data, one module per physical topic: carbon diffusivity, the surface
(alloy factor, mass transfer), austenite limits, carbon → hardness, furnace-atmosphere readings,
the Fe–N system and the steel library. Pure functions of SI arguments; no state, no solver."""
