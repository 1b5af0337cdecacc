import sys

from basisbook.commands.cli import main

sys.exit(main())
