"""`python -m reporter` runs the same CLI as the `waymark` console script."""

from reporter.cli import main

if __name__ == "__main__":
    main()
