"""Acquisition: every source turns bytes, registers or log rows into `Sample`s. No Textual here."""
