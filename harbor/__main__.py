"""``python -m harbor`` runs the command line."""

from harbor.cli import main

# Guarded: worker processes of an embedded Dask cluster are started with "spawn", which
# imports the main module again in each child.
if __name__ == "__main__":
    raise SystemExit(main())
