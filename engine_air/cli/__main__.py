import sys

from engine_air.cli.commands import main

sys.exit(main())
