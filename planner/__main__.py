"""``python -m planner``: the same command line as the ``splitplan`` script."""

from planner.cli import main

if __name__ == "__main__":
    main()
