import sys

from torrid.interface.cli import main

sys.exit(main())
