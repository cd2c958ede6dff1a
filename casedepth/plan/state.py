"""The plan: everything a planner edits, as one plain state object (no Qt).

A :class:`Plan` holds a value for every row of the parameter table (:mod:`casedepth.parameters`),
typed as the row says; it tells listeners of every change of a field, keeps an undo/redo stack of
edits, and knows the newer models and policies it may be offered (:meth:`Plan.offers`). The window
binds its widgets to it by key; the command line and the Python API build the same object. Values
are SI inside (K, m, m/s) and carbon in wt %.
"""

from __future__ import annotations

import copy
from typing import Any, Callable

from ..errors import InputError
from ..models import steels
from ..outcome import Offer
from ..parameters import PARAMETERS, Choice, check, defaults, label


class Plan:
    """Editable, observable, undoable state of one plan.

    ``Plan(treatment="nitriding", kn=2.5)`` starts from the defaults of the treatment (the same ones
    the window starts from) with the values given. Read values as attributes (``plan.temperature``);
    change them with :meth:`set` or :meth:`update` so listeners hear of it and the change can be undone.
    A value of the wrong type, or a choice not in its table, is refused with an :class:`InputError`
    naming the key.
    """

    def __init__(self, treatment: str = "carburizing", **values):
        self._values: dict[str, Any] = defaults(treatment)
        if "steel" in values and "composition" not in values:  # a grade named alone comes with its composition
            try:
                values["composition"] = dict(steels.find(values["steel"]).composition)
            except InputError:
                pass
        for key, value in values.items():
            self._values[key] = check(key, copy.deepcopy(value))
        self._listeners: list[Callable[[str, Any], None]] = []
        self._undo: list[dict[str, tuple[Any, Any]]] = []
        self._redo: list[dict[str, tuple[Any, Any]]] = []
        self.modified = False
        #: offers the plan's file came with (a newer policy than the one it was made with), see :meth:`offers`
        self.file_offers: list[Offer] = []
        #: what reading its file had to assume (a value the file's schema did not hold yet)
        self.file_notes: list[str] = []

    # -- access ------------------------------------------------------------------------------------------
    def __getattr__(self, name: str):
        values = self.__dict__.get("_values")
        if values is not None and name in values:
            value = values[name]
            return copy.deepcopy(value) if isinstance(value, (dict, list)) else value
        raise AttributeError(name)

    def values(self) -> dict[str, Any]:
        """A snapshot of every value (safe to hand to another thread)."""
        return copy.deepcopy(self._values)

    def subscribe(self, listener: Callable[[str, Any], None]) -> None:
        """Call ``listener(key, value)`` after every change of a field."""
        self._listeners.append(listener)

    # -- changes -------------------------------------------------------------------------------------------
    def set(self, key: str, value: Any, coalesce: bool = False) -> None:
        """Change one field. With ``coalesce``, a change of the same field as the last edit joins that
        edit in the undo stack (typing 9, 92, 925 is one edit, not three)."""
        if coalesce and self._undo and list(self._undo[-1]) == [key] and not self._redo:
            old = self._undo[-1][key][0]
            self._apply({key: value}, record=False)
            if self._values[key] == old:
                self._undo.pop()
            else:
                self._undo[-1] = {key: (old, copy.deepcopy(self._values[key]))}
            return
        self.update(**{key: value})

    def update(self, **values) -> None:
        """Change several fields as one undoable edit."""
        self._apply(values, record=True)

    def _apply(self, values: dict[str, Any], record: bool) -> None:
        checked = {key: check(key, copy.deepcopy(value)) for key, value in values.items()}
        for key, value in list(checked.items()):  # what changes with a value picked (unless given too)
            row = PARAMETERS[key]
            if row.companions is not None and value != self._values[key]:
                for other, companion in row.companions({**self._values, **checked}, value).items():
                    checked.setdefault(other, check(other, companion))
        change = {}
        for key, value in checked.items():
            old = self._values[key]
            if old == value and type(old) is type(value):
                continue
            change[key] = (copy.deepcopy(old), copy.deepcopy(value))
            self._values[key] = value
        if not change:
            return
        if record:
            self._undo.append(change)
            self._redo.clear()
        self.modified = True
        self._notify(change, 1)

    def _notify(self, change: dict[str, tuple[Any, Any]], which: int) -> None:
        for key, pair in change.items():
            for listener in list(self._listeners):
                listener(key, copy.deepcopy(pair[which]))

    @property
    def can_undo(self) -> bool:
        return bool(self._undo)

    @property
    def can_redo(self) -> bool:
        return bool(self._redo)

    def undo(self) -> None:
        self._replay(self._undo, self._redo, 0)

    def redo(self) -> None:
        self._replay(self._redo, self._undo, 1)

    def _replay(self, source: list, target: list, which: int) -> None:
        """Move the last edit from ``source`` to ``target``, restoring side ``which`` (0 old, 1 new)."""
        if not source:
            return
        change = source.pop()
        for key, pair in change.items():
            self._values[key] = copy.deepcopy(pair[which])
        target.append(change)
        self.modified = True
        self._notify(change, which)

    # -- edits that change several fields together ------------------------------------------------------------
    def choose_steel(self, name: str) -> None:
        """Pick a library grade: its name and its nominal composition, as one edit."""
        steel = steels.find(name)
        self.update(steel=steel.name, composition=dict(steel.composition))

    # -- newer models and policies ------------------------------------------------------------------------------
    def offers(self) -> list[Offer]:
        """Newer models or policies this plan may take (never applied without being asked): those its file
        came with while the plan still holds the older value, and any superseded model it names."""
        out = [offer for offer in self.file_offers
               if self._values[offer.key] != offer.value and PARAMETERS[offer.key].used_by(self._values)]
        for key, row in PARAMETERS.items():
            if isinstance(row.kind, Choice) and row.used_by(self._values):
                newer = row.kind.superseded(self._values[key])
                if newer is not None and all(o.key != key for o in out):
                    out.append(Offer(key, newer, f"{label(key)}: this plan uses “{row.kind.options[self._values[key]]}”, "
                                                 f"which is superseded by “{row.kind.options[newer]}”."))
        return out

    def accept(self, offer: Offer) -> None:
        """Take a newer model or policy (one undoable edit)."""
        self.set(offer.key, offer.value)
