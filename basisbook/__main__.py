import sys

from basisbook.cli import main

sys.exit(main())
