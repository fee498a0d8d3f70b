import sys

from fvheat.cli.main import main

sys.exit(main())
