"""Messages in the workbook's own words: input labels and boxes, not case-file keys or command flags.

The calculations and the parsers address an error to a case-file key (``flash_pressure``,
``vessel.vapour_velocity``, ``stages[0]``) and say how to fix it in a case file
(``add mass_flow to [inputs]``). A workbook user types into labelled boxes, so the form puts the
same message in those words: each key becomes its label, and a case-file fix becomes what to do
in the form.
"""

from __future__ import annotations

import re

from ..calcs.base import field_key, field_path, input_fields


class FormWords:
    """Turns case-file keys into the labels of a kind's form.

    Parameters
    ----------
    inputs_class : type
        The kind's Inputs dataclass.

    Examples
    --------
    >>> from steamcalc.calcs import get_calculation
    >>> words = FormWords(get_calculation("flash").Inputs)
    >>> words.text("give flash_pressure or stages (exactly one)")
    "give 'Flash pressure' or 'Cascade stage pressures' (exactly one)"
    >>> words.field_name("stages[1]"), words.field_name("vessel.vapour_velocity")
    ('stages', 'vapour_velocity')
    >>> words.fix("add condensate_flow to [inputs]")
    "fill in the 'Condensate flow' box"
    """

    def __init__(self, inputs_class, system="SI"):
        # The site's display system: a US site's messages write their quantities in US units (by pint).
        self.system = system
        self.labels = {}
        self._names = {}
        for f in input_fields(inputs_class):
            label = f.metadata["label"]
            self.labels[f.name] = label
            for address in {f.name, field_path(f), field_key(f) if f.metadata["section"] is None else field_path(f)}:
                self._names[address] = f.name
        # Longest first, so that "relief.set_pressure" is replaced before "set_pressure".
        addresses = sorted(self._names, key=len, reverse=True)
        # A key with '_' or '.' is never an English word; a one-word key ("stages", "vented") is replaced
        # only where a sentence names it as an input (after "give", "or", "of", before "=" ...).
        coded = [re.escape(a) for a in addresses if "_" in a or "." in a]
        plain = [re.escape(a) for a in addresses if "_" not in a and "." not in a]
        self._coded = re.compile(r"(?<![\w.'])(" + "|".join(coded) + r")(\[\d+\])?(?![\w'])") if coded else None
        self._plain = re.compile(r"\b(give |or |of |and |)(" + "|".join(plain) + r")(\[\d+\])?\b(?!')") if plain else None

    def field_name(self, address):
        """The form field an error's field (a key, ``section.key`` or ``key[i]``) belongs to, or None."""
        if not address:
            return None
        return self._names.get(re.sub(r"\[\d+\]$", "", str(address)))

    def label(self, address):
        name = self.field_name(address)
        return self.labels[name] if name else str(address)

    def _quoted(self, address, index=None):
        label = f"'{self.label(address)}'"
        if index:
            label += f" (item {int(index.strip('[]')) + 1})"
        return label

    def text(self, text):
        """``text`` with each case-file key replaced by its label in quotes."""
        if not text:
            return text
        text = re.sub(r"\[inputs\.(\w+)\] (\w+)", r"\1.\2", str(text))
        text = re.sub(r"(\w+) = \[\.\.\.\]", r"\1", text)
        if self._coded is not None:
            text = self._coded.sub(lambda m: self._quoted(m.group(1), m.group(2)), text)
        if self._plain is not None:
            text = self._plain.sub(self._plain_key, text)
        return text

    def _plain_key(self, m):
        before, key, index = m.group(1), m.group(2), m.group(3)
        after = m.string[m.end():m.end() + 2]
        if not before and after != " =":
            return m.group(0)
        return before + self._quoted(key, index)

    def quantities(self, text):
        """A message's quantities in the display system: ``"15.99 bar(a)"`` reads ``"231.9 psia"`` on a US site.

        Only the calculation's own writing is converted; what the user typed is quoted as typed elsewhere.
        """
        if self.system != "US" or not text:
            return text
        from ..render.display import us_label

        return us_label(text)

    def fix(self, fix):
        """A case-file fix as what to do in the form."""
        if not fix:
            return fix
        fix = re.sub(r"add (\S+) to \[inputs(?:\.\w+)?\]", lambda m: f"fill in the {self._quoted(m.group(1))} box",
                     str(fix))
        return self.text(fix)

    def error(self, exc, given=None):
        """The message of a SteamcalcError for the box it concerns: what is wrong, the value, the range, the fix.

        The field is not named (the message stands beside its box); the file is not named (the
        form is the source). ``given`` is the value as the form writes it (in the units typed in its
        box; ``""`` for none); by default the error writes its own.
        """
        message = self.quantities(self.text(exc.message))
        if exc.fix and not message.endswith((".", ":", "!", "?")):
            message += "."
        return exc.explained(message, self.fix(exc.fix), given)
