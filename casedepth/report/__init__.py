"""What is handed on: printed documents (:mod:`.documents`) and exported profiles (:mod:`.export`)."""
