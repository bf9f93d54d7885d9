import sys

from swingsim.cli import main

sys.exit(main())
