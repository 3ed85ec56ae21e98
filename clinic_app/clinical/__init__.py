"""Pure clinical core: plain functions and frozen dataclasses, no I/O. See README.md."""
