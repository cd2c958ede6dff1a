"""The shop's side: standard times and rates and the cycle quote (:mod:`.quote`), several parts in one
furnace load (:mod:`.loads`), and calibration on the shop's own measured sections (:mod:`.calibration`)."""
