"""Gas carburizing: the validated furnace step (:mod:`.setup`), one soak forward and inverse
(:mod:`.soak`), whole cycles of stages (:mod:`.cycle`), the planners that choose stage lengths for
targets (:mod:`.planners`) and a plan's outcome (:mod:`.outcome`)."""
