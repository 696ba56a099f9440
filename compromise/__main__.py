"""Run the command line as ``python -m compromise``."""

from compromise.cli import main

main()
