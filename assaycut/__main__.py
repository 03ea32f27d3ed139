"""`python -m assaycut` runs the command line."""

from .cli import main

main()
